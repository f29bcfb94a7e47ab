import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import type { Club } from '../../models'
import type { MemberDirectoryQuery } from '#shared/schemas/member'
import type { VesselListQuery } from '#shared/schemas/vessel'
import type { CsvValue } from '#shared/utils/csv'
import { MEMBERSHIP_STATUS_LABELS } from '#shared/utils/membership-status'
import { tierCode, tierState, TIER_STATE_WORDS } from '#shared/utils/tier-rules'
import { clubToday } from '../clubs'
import { listMembers } from '../members'
import { listVessels } from '../vessels'

/** A CSV export: its columns, then its rows (numbers stay numbers; the writer neutralises formulas). */
export interface CsvExport {
  header: readonly string[]
  rows: CsvValue[][]
}

/** The member directory as the officer filtered and sorted it, every page (members.read). */
export async function membersExport(club: Pick<Club, 'id' | 'timeZone' | 'graceDays'>, query: MemberDirectoryQuery): Promise<CsvExport> {
  const items = await allPages((page, pageSize) => listMembers(club, { ...query, page, pageSize }))
  return {
    header: ['name', 'email', 'roles', 'status', 'paid_through', 'joined_on', 'junior', 'approved_at'],
    rows: items.map(m => [m.name, m.email, m.roles.join(' '), MEMBERSHIP_STATUS_LABELS[m.status], m.paidThrough, m.joinedOn, m.junior, m.approvedAt]),
  }
}

/** The vessels list as filtered and sorted, every page: the viewer's own, or the club's with `readAll`. */
export async function vesselsExport(viewer: { clubId: string, membershipId: string, readAll: boolean }, query: VesselListQuery): Promise<CsvExport> {
  const items = await allPages((page, pageSize) => listVessels(viewer, { ...query, page, pageSize }))
  return {
    header: ['tag', 'name', 'owner', 'construction', 'state', 'volume_l', 'diameter_mm', 'rated_fill_bar', 'proof_valid_through', 'registered_at'],
    rows: items.map(v => [v.tag, v.name, v.owner.name, v.construction, v.effectiveState, v.volumeL, v.diameterMm, v.ratedFillBar, v.validThroughOn, v.registeredAt]),
  }
}

/**
 * Training records, newest first: one member's (`membershipId`), or the whole club's when it is absent.
 * Imported records not yet confirmed say so (the fill gate ignores them until an instructor confirms).
 */
export async function trainingRecordsExport(clubId: string, membershipId: string | undefined): Promise<CsvExport> {
  const rows = await useDb().query<Record<string, string | number | boolean | null>>(
    `SELECT u.name AS member, c.code AS course, r.subject, r.trained_from::text AS trained_from, r.trained_to::text AS trained_to,
            r.trainer_name, r.result, r.theory_score_percent, r.practical_signed_off, r.expires_on::text AS expires_on,
            r.taken_elsewhere, r.retraining_reason, r.imported, r.confirmed_at IS NOT NULL AS confirmed
       FROM training_records r JOIN courses c ON c.id = r.course_id
       JOIN memberships m ON m.id = r.membership_id JOIN users u ON u.id = m.user_id
      WHERE r.club_id = :clubId ${membershipId ? 'AND r.membership_id = :membershipId' : ''}
      ORDER BY r.trained_to DESC, u.name, r.id LIMIT ${EXPORT_MAX_ROWS}`,
    { replacements: { clubId, membershipId: membershipId ?? null }, type: QueryTypes.SELECT })
  const header = ['member', 'course', 'subject', 'trained_from', 'trained_to', 'trainer_name', 'result', 'theory_score_percent',
    'practical_signed_off', 'expires_on', 'taken_elsewhere', 'retraining_reason', 'imported', 'confirmed']
  return { header, rows: rows.map(r => header.map(k => r[k] ?? null)) }
}

interface TierRow {
  member: string
  rank: number
  tier_name: string
  fill_cap_bar: number
  first_granted_on: string
  signed_on: string
  expires_on: string
  suspended: boolean
  revoked: boolean
  initial: boolean
  imported: boolean
  confirmed: boolean
  assessor: string | null
}

/** Every tier the club's members hold or held (one member's with `membershipId`), with its state on the club's today. */
export async function tierHoldingsExport(actor: Actor, membershipId: string | undefined): Promise<CsvExport> {
  const today = clubToday(actor.club)
  const rows = await useDb().query<TierRow>(
    `SELECT u.name AS member, t.rank, l.name AS tier_name, l.fill_cap_bar, t.first_granted_on::text AS first_granted_on, t.signed_on::text AS signed_on,
            t.expires_on::text AS expires_on, t.suspended_at IS NOT NULL AS suspended, t.revoked_at IS NOT NULL AS revoked, t.initial,
            t.imported, t.confirmed_at IS NOT NULL AS confirmed, t.imported_assessor_name AS assessor
       FROM member_tiers t JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
       JOIN memberships m ON m.id = t.membership_id JOIN users u ON u.id = m.user_id
      WHERE t.club_id = :clubId ${membershipId ? 'AND t.membership_id = :membershipId' : ''}
      ORDER BY u.name, m.id, t.rank LIMIT ${EXPORT_MAX_ROWS}`,
    { replacements: { clubId: actor.club.id, membershipId: membershipId ?? null }, type: QueryTypes.SELECT })
  return {
    header: ['member', 'tier', 'tier_name', 'fill_cap_bar', 'state', 'first_granted_on', 'signed_on', 'expires_on', 'initial', 'imported', 'confirmed', 'imported_assessor'],
    rows: rows.map(r => [r.member, tierCode(r.rank), r.tier_name, Number(r.fill_cap_bar), TIER_STATE_WORDS[tierState({ expiresOn: r.expires_on, suspended: r.suspended, revoked: r.revoked }, today)].label,
      r.first_granted_on, r.signed_on, r.expires_on, r.initial, r.imported, r.confirmed, r.assessor]),
  }
}
