import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockMemberships } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubToday } from '../clubs'
import { assessorProblem, renewalGaps, tierCode, tierExpiresOn, tierGaps, tierState, type TierRank } from '#shared/utils/tier-rules'
import type { TierGrantInput, TierRenewalInput } from '#shared/schemas/tiers'
import type { TierSignoffDto } from '#shared/types/tiers'
import { grantFacts, heldTierRows, openIncidentCount, toHeldTier, validRankOf, type HeldTierRow } from './held'
import { loadTierLevel, loadTierTable } from './levels'

/**
 * 422 unless `actor` may sign off tier `rank` for member `membershipId`: nobody signs their own
 * (SELF_SIGN_OFF); otherwise the role and the assessor's own valid tier decide (ASSESSOR_NOT_QUALIFIED).
 */
export async function requireQualifiedAssessor(actor: Actor, membershipId: string, rank: TierRank, today: string, transaction: Transaction): Promise<void> {
  if (actor.membership.id === membershipId) refuse({ code: 'SELF_SIGN_OFF', message: 'Nobody signs off their own tier: another assessor does.' })
  const problem = assessorProblem({ membershipId: actor.membership.id, roles: actor.roles, validRank: await validRankOf(actor.membership.id, today, transaction) }, membershipId, rank)
  if (problem) refuse({ code: 'ASSESSOR_NOT_QUALIFIED', message: problem })
}

/** Locks member `membershipId` of the actor's club (step 1 of the lock order), or 404. */
async function lockMember(actor: Actor, membershipId: string, transaction: Transaction): Promise<void> {
  const rows = await lockMemberships([membershipId], transaction, actor.club.id)
  if (!rows.size) notFound('No such member')
}

async function insertSignoff(o: { clubId: string, memberTierId: string, membershipId: string, rank: number, kind: TierSignoffDto['kind'], signedOn: string, expiresOn: string, assessorId: string | null, notes: string }, transaction: Transaction): Promise<string> {
  const [row] = await useDb().query<{ id: string }>(
    `INSERT INTO tier_signoffs (club_id, member_tier_id, membership_id, rank, kind, signed_on, expires_on, assessor_membership_id, notes)
     VALUES (:clubId, :memberTierId, :membershipId, :rank, :kind, :signedOn, :expiresOn, :assessorId, :notes) RETURNING id`,
    { replacements: o, type: QueryTypes.SELECT, transaction })
  return row!.id
}

/**
 * An assessor grants member `membershipId` tier `input.rank` (tiers.grant). Under the member's row
 * lock, so two grants never race: the assessor must be qualified (never oneself), and every
 * prerequisite is checked — a refusal lists them all (422). A tier never held is created; one that
 * expired is signed again (held since its first grant); one that was revoked starts afresh. A valid
 * tier is renewed, not granted again; a suspended one is reinstated. Audited.
 */
export async function grantTier(actor: Actor, membershipId: string, input: TierGrantInput): Promise<TierSignoffDto> {
  const clubId = actor.club.id
  const today = clubToday(actor.club)
  const signedOn = input.signedOn ?? today
  return inTransaction(async (transaction) => {
    await lockMember(actor, membershipId, transaction)
    const rank = input.rank as TierRank
    await requireQualifiedAssessor(actor, membershipId, rank, today, transaction)
    if (signedOn > today) refuse({ code: 'SIGNED_ON_IN_FUTURE', message: `A sign-off is dated on or before today (${today}).` })
    const table = await loadTierTable(clubId, transaction)
    const level = table.levels.find(l => l.rank === rank)!
    const existing = (await heldTierRows(membershipId, transaction)).find(r => r.rank === rank)
    if (existing) {
      const state = tierState(toHeldTier(existing), today)
      if (state === 'valid') refuse({ code: 'TIER_ALREADY_HELD', message: `${tierCode(rank)} is held and valid: renew it instead.` })
      if (state === 'suspended') refuse({ code: 'TIER_SUSPENDED', message: `${tierCode(rank)} is suspended: the safety officer reinstates it.` })
    }
    const gaps = tierGaps(await grantFacts(clubId, membershipId, level, table.juniorCapRank, today, transaction))
    if (gaps.length) refuse(gaps)
    const expiresOn = tierExpiresOn(signedOn, level.validityMonths)
    if (expiresOn < today) refuse({ code: 'SIGNED_ON_TOO_OLD', message: `A tier signed on ${signedOn} would have expired on ${expiresOn}: date the sign-off within its validity.` })
    // A revoked tier starts afresh; an expired one keeps the day it was first granted. An unconfirmed
    // imported tier of that rank is replaced by this grant (which confirms it), from today's sign-off.
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on)
       VALUES (:clubId, :membershipId, :rank, :signedOn, :signedOn, :expiresOn)
       ON CONFLICT (membership_id, rank) DO UPDATE SET
         first_granted_on = CASE WHEN member_tiers.revoked_at IS NOT NULL OR member_tiers.confirmed_at IS NULL THEN EXCLUDED.first_granted_on
                                 ELSE LEAST(member_tiers.first_granted_on, EXCLUDED.first_granted_on) END,
         signed_on = EXCLUDED.signed_on, expires_on = EXCLUDED.expires_on, initial = false,
         suspended_at = NULL, suspension_reason = NULL, suspended_by_membership_id = NULL,
         revoked_at = NULL, revocation_reason = NULL, revoked_by_membership_id = NULL,
         confirmed_by_membership_id = CASE WHEN member_tiers.confirmed_at IS NULL THEN :assessorId ELSE member_tiers.confirmed_by_membership_id END,
         confirmed_at = COALESCE(member_tiers.confirmed_at, now()), updated_at = now()
       RETURNING id`,
      { replacements: { clubId, membershipId, rank, signedOn, expiresOn, assessorId: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    const notes = input.notes ?? ''
    const id = await insertSignoff({ clubId, memberTierId: row!.id, membershipId, rank, kind: 'grant', signedOn, expiresOn, assessorId: actor.membership.id, notes }, transaction)
    await recordAudit(actor, clubId, {
      action: 'tier.grant', subjectType: 'membership', subjectId: membershipId,
      before: existing ? { rank, tierState: tierState(toHeldTier(existing), today), expiresOn: existing.expires_on } : null,
      after: { rank, signedOn, expiresOn, signoffId: id },
    }, transaction)
    return { id, rank, kind: 'grant', signedOn, expiresOn, assessor: { id: actor.membership.id, name: actor.user.name }, notes, evidence: [] }
  })
}

/** Member `membershipId`'s held tier `rank`, or 404. */
export function heldOr404(rows: HeldTierRow[], rank: number): HeldTierRow {
  const row = rows.find(r => r.rank === rank)
  if (!row) notFound(`No ${tierCode(rank)} held by this member`)
  return row
}

/**
 * An assessor qualified as for a grant re-signs member `membershipId`'s tier `rank` (tiers.grant):
 * the club's minimum fills logged within the current validity (from its last sign-off to today) and
 * no open incident. The validity restarts today. A suspended or revoked tier is not renewed. Audited.
 */
export async function renewTier(actor: Actor, membershipId: string, rank: TierRank, input: TierRenewalInput): Promise<TierSignoffDto> {
  const clubId = actor.club.id
  const today = clubToday(actor.club)
  return inTransaction(async (transaction) => {
    await lockMember(actor, membershipId, transaction)
    const held = heldOr404(await heldTierRows(membershipId, transaction), rank)
    await requireQualifiedAssessor(actor, membershipId, rank, today, transaction)
    const state = tierState(toHeldTier(held), today)
    if (state === 'suspended') refuse({ code: 'TIER_SUSPENDED', message: `${tierCode(rank)} is suspended: the safety officer reinstates it.` })
    if (state === 'revoked') refuse({ code: 'TIER_REVOKED', message: `${tierCode(rank)} was revoked: only a new grant restores it.` })
    const level = (await loadTierLevel(clubId, rank, transaction))!
    const [fills] = await useDb().query<{ n: number }>(
      `SELECT count(*)::int AS n FROM fills WHERE membership_id = :membershipId AND allowed AND flagged_reasons IS NULL AND held_on BETWEEN :from AND :today`,
      { replacements: { membershipId, from: held.signed_on, today }, type: QueryTypes.SELECT, transaction })
    const gaps = renewalGaps({ level, fillsWithinValidity: fills?.n ?? 0, openIncidents: await openIncidentCount(membershipId, transaction) })
    if (gaps.length) refuse(gaps)
    const expiresOn = tierExpiresOn(today, level.validityMonths)
    await useDb().query('UPDATE member_tiers SET signed_on = :today, expires_on = :expiresOn, updated_at = now() WHERE id = :id',
      { replacements: { id: held.id, today, expiresOn }, transaction })
    const notes = input.notes ?? ''
    const id = await insertSignoff({ clubId, memberTierId: held.id, membershipId, rank, kind: 'renewal', signedOn: today, expiresOn, assessorId: actor.membership.id, notes }, transaction)
    await recordAudit(actor, clubId, {
      action: 'tier.renew', subjectType: 'membership', subjectId: membershipId,
      before: { rank, signedOn: held.signed_on, expiresOn: held.expires_on }, after: { rank, signedOn: today, expiresOn, signoffId: id },
    }, transaction)
    return { id, rank, kind: 'renewal', signedOn: today, expiresOn, assessor: { id: actor.membership.id, name: actor.user.name }, notes, evidence: [] }
  })
}
