import { QueryTypes, type Transaction, type Sequelize } from 'sequelize'
import {
  highestValidRank, juniorForTiers, tierCode, tierGaps, tierState, usableRank,
  type GrantFacts, type HeldTier, type TierLevel, type TierRank,
} from '#shared/utils/tier-rules'
import type { HeldTierDto, MemberTiersDto, TierSignoffDto } from '#shared/types/tiers'
import { coursesNotCurrent } from '../training'
import { loadTierTable } from './levels'

/** A member_tiers row as the services read it. */
export interface HeldTierRow {
  id: string
  rank: number
  first_granted_on: string
  signed_on: string
  expires_on: string
  initial: boolean
  suspended_at: Date | null
  suspension_reason: string | null
  revoked_at: Date | null
  revocation_reason: string | null
}

const HELD_COLUMNS = `id, rank, first_granted_on::text AS first_granted_on, signed_on::text AS signed_on, expires_on::text AS expires_on,
  initial, suspended_at, suspension_reason, revoked_at, revocation_reason`

/** The held tier a row stands for, as the pure rules take it. */
export function toHeldTier(r: HeldTierRow): HeldTier {
  return { rank: r.rank as TierRank, firstGrantedOn: r.first_granted_on, signedOn: r.signed_on, expiresOn: r.expires_on, suspended: !!r.suspended_at, revoked: !!r.revoked_at }
}

/** Every tier member `membershipId` holds or held (any state), lowest rank first. */
export async function heldTierRows(membershipId: string, transaction?: Transaction, db: Sequelize = useDb()): Promise<HeldTierRow[]> {
  return db.query<HeldTierRow>(`SELECT ${HELD_COLUMNS} FROM member_tiers WHERE membership_id = :membershipId AND confirmed_at IS NOT NULL ORDER BY rank`,
    { replacements: { membershipId }, type: QueryTypes.SELECT, transaction })
}

/** Member `membershipId`'s highest tier valid on `today` (the fall-back rule), or null. */
export async function validRankOf(membershipId: string, today: string, transaction?: Transaction): Promise<TierRank | null> {
  return highestValidRank((await heldTierRows(membershipId, transaction)).map(toHeldTier), today)
}

/**
 * Open incidents among whose people involved member `membershipId` is named (the reporter alone is
 * not involved): a renewal waits until the safety officer has closed them.
 */
export async function openIncidentCount(membershipId: string, transaction?: Transaction): Promise<number> {
  const [row] = await useDb().query<{ n: number }>(
    `SELECT count(*)::int AS n FROM incident_people p JOIN incidents i ON i.id = p.incident_id
      WHERE p.membership_id = :membershipId AND i.status = 'open'`,
    { replacements: { membershipId }, type: QueryTypes.SELECT, transaction })
  return row?.n ?? 0
}

/**
 * What a grant of `level` to member `membershipId` of club `clubId` is decided on, on `today`: their
 * courses (training's one validity rule), the tier below, fills logged as allowed with them as the
 * member, supervised fills (above the level's pressure when it names one; a fill flagged after an offline
 * sync counts for neither: it broke a rule), and whether a vessel of
 * theirs has passed a witnessed proof test. One query for the counts.
 */
export async function grantFacts(clubId: string, membershipId: string, level: TierLevel, juniorCapRank: number, today: string, transaction?: Transaction): Promise<GrantFacts> {
  const [counts] = await useDb().query<{ birth_date: string | null, logged: number, supervised: number, proof: boolean }>(
    `SELECT m.birth_date::text AS birth_date,
       (SELECT count(*)::int FROM fills f WHERE f.membership_id = m.id AND f.allowed AND f.flagged_reasons IS NULL) AS logged,
       (SELECT count(*)::int FROM fills f WHERE f.membership_id = m.id AND f.allowed AND f.flagged_reasons IS NULL AND f.supervisor_membership_id IS NOT NULL
          AND (:above::float8 IS NULL OR f.pressure_bar > :above::float8)) AS supervised,
       EXISTS (SELECT 1 FROM proof_tests p JOIN vessels v ON v.id = p.vessel_id
                WHERE v.owner_membership_id = m.id AND p.result = 'pass') AS proof
     FROM memberships m WHERE m.id = :membershipId AND m.club_id = :clubId`,
    { replacements: { clubId, membershipId, above: level.supervisedFillsAboveBar }, type: QueryTypes.SELECT, transaction })
  const below = level.rank > 0 ? (await heldTierRows(membershipId, transaction)).find(r => r.rank === level.rank - 1) : undefined
  const notCurrent = await coursesNotCurrent(clubId, membershipId, level.requiredCourseCodes, today, transaction)
  return {
    level,
    today,
    birthDate: counts?.birth_date ?? null,
    juniorCapRank,
    coursesNotCurrent: notCurrent.map(c => c.name),
    heldBelow: below ? toHeldTier(below) : null,
    loggedFills: counts?.logged ?? 0,
    supervisedFills: counts?.supervised ?? 0,
    ownVesselProofPassed: !!counts?.proof,
  }
}

interface SignoffRow {
  id: string
  rank: number
  kind: TierSignoffDto['kind']
  signed_on: string
  expires_on: string
  assessor_membership_id: string | null
  assessor_name: string | null
  notes: string
  evidence: { id: string, contentType: string }[] | null
}

/** Every sign-off of member `membershipId`, newest first, with its assessor and evidence. */
async function signoffsOf(membershipId: string, transaction?: Transaction): Promise<TierSignoffDto[]> {
  const rows = await useDb().query<SignoffRow>(
    `SELECT s.id, s.rank, s.kind, s.signed_on::text AS signed_on, s.expires_on::text AS expires_on, s.assessor_membership_id,
            u.name AS assessor_name, s.notes,
            (SELECT json_agg(json_build_object('id', e.id, 'contentType', e.content_type) ORDER BY e.created_at)
               FROM tier_evidence e WHERE e.signoff_id = s.id) AS evidence
       FROM tier_signoffs s
       LEFT JOIN memberships a ON a.id = s.assessor_membership_id LEFT JOIN users u ON u.id = a.user_id
      WHERE s.membership_id = :membershipId ORDER BY s.signed_on DESC, s.created_at DESC`,
    { replacements: { membershipId }, type: QueryTypes.SELECT, transaction })
  return rows.map(r => ({
    id: r.id, rank: r.rank as TierRank, kind: r.kind, signedOn: r.signed_on, expiresOn: r.expires_on,
    assessor: r.assessor_membership_id ? { id: r.assessor_membership_id, name: r.assessor_name ?? '' } : null,
    notes: r.notes, evidence: r.evidence ?? [],
  }))
}

/**
 * Where member `membershipId` of club `clubId` stands in the pressure tiers on `today`: every tier
 * held with its state, cap and expiry (and sign-offs), the highest valid one (the fall-back), the one
 * they may use (the junior cap), and every prerequisite the next tier still needs. Null when the
 * member is not in the club.
 */
export async function memberTierStanding(clubId: string, membershipId: string, today: string, transaction?: Transaction): Promise<MemberTiersDto | null> {
  const [member] = await useDb().query<{ birth_date: string | null }>(
    'SELECT birth_date::text AS birth_date FROM memberships WHERE id = :membershipId AND club_id = :clubId',
    { replacements: { membershipId, clubId }, type: QueryTypes.SELECT, transaction })
  if (!member) return null
  const [table, rows, signoffs] = await Promise.all([
    loadTierTable(clubId, transaction), heldTierRows(membershipId, transaction), signoffsOf(membershipId, transaction),
  ])
  const byRank = new Map(table.levels.map(l => [l.rank as number, l]))
  const junior = juniorForTiers(member.birth_date, today)
  const validRank = highestValidRank(rows.map(toHeldTier), today)
  const held: HeldTierDto[] = rows.map(r => ({
    rank: r.rank as TierRank,
    code: tierCode(r.rank),
    name: byRank.get(r.rank)?.name ?? tierCode(r.rank),
    fillCapBar: byRank.get(r.rank)?.fillCapBar ?? 0,
    state: tierState(toHeldTier(r), today),
    firstGrantedOn: r.first_granted_on,
    signedOn: r.signed_on,
    expiresOn: r.expires_on,
    initial: r.initial,
    suspensionReason: r.suspension_reason,
    revocationReason: r.revocation_reason,
    signoffs: signoffs.filter(s => s.rank === r.rank),
  })).reverse()
  const nextLevel = byRank.get(validRank === null ? 0 : validRank + 1)
  const next = nextLevel
    ? {
        rank: nextLevel.rank, code: tierCode(nextLevel.rank), name: nextLevel.name, fillCapBar: nextLevel.fillCapBar,
        gaps: tierGaps(await grantFacts(clubId, membershipId, nextLevel, table.juniorCapRank, today, transaction)),
      }
    : null
  return {
    membershipId, today, junior, birthDateMissing: !member.birth_date, juniorCapRank: table.juniorCapRank,
    validRank, usableRank: usableRank(validRank, junior, table.juniorCapRank), held, next,
  }
}
