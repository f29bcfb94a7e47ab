import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { statusPredicates } from '../members'
import { clubVesselRules, deriveProofStanding, loadProofFacts } from '../vessels'
import type { LaunchRosterDto, LaunchRosterRowDto } from '#shared/types/events'
import { courseStanding, isCurrentStanding } from '#shared/utils/training-validity'
import { highestValidRank, juniorForTiers, usableRank, type HeldTier } from '#shared/utils/tier-rules'
import { FILL_COURSE_CODE } from '#shared/utils/fill-gate'
import { eventFillLimitBar } from '#shared/utils/event-rules'
import type { VesselConstruction } from '#shared/utils/vessel-arithmetic'
import type { VesselState } from '#shared/utils/vessel-states'

interface RosterMemberRow {
  id: string
  name: string
  walk_in: boolean
  birth_date: string | null
  active: boolean
  waiver_current: boolean
  course_expires_on: string | null
  course_retraining: boolean | null
  tiers: { rank: number, expiresOn: string, suspended: boolean, revoked: boolean }[] | null
}

/**
 * The launch-day roster of event `id`: every member registered (walk-ins too, not those who
 * withdrew), their highest valid tier (held to the junior cap), what they may fill to here — the
 * lower of that tier's cap and the event's cap —, their vessels in service with rated fills (a vessel
 * due for retest is not in service), and whether they miss a waiver, the fill course or dues. One
 * query for the members, one for their vessels, two for the vessels' proofs. 404 when not the club's.
 */
export async function eventRoster(actor: Actor, id: string, now = new Date()): Promise<LaunchRosterDto> {
  const clubId = actor.club.id
  const today = clubToday(actor.club, now)
  const [event] = await useDb().query<{ id: string, held_on: string, site: string, pressure_cap_bar: string, competition: boolean, cancelled: boolean, junior_cap_rank: number | null, course_name: string | null }>(
    `SELECT e.id, e.held_on::text AS held_on, e.site, e.pressure_cap_bar, e.competition, e.cancelled_at IS NOT NULL AS cancelled,
        (SELECT p.junior_cap_rank FROM vessel_policies p WHERE p.club_id = e.club_id) AS junior_cap_rank,
        (SELECT c.name FROM courses c WHERE c.club_id = e.club_id AND c.code = :course) AS course_name
      FROM launch_events e WHERE e.id = :id AND e.club_id = :clubId`,
    { replacements: { id, clubId, course: FILL_COURSE_CODE }, type: QueryTypes.SELECT })
  if (!event) notFound('No such event')
  const eventCapBar = Number(event.pressure_cap_bar)
  const status = statusPredicates({ today: ':today', graceDays: ':graceDays' })
  // Each member once, with their status, waiver, the fill course's latest passing record and every tier held.
  const members = await useDb().query<RosterMemberRow>(
    `SELECT m.id, u.name, r.walk_in, m.birth_date::text AS birth_date, (${status.active}) AS active,
        (SELECT max(w.version) FROM waivers w WHERE w.club_id = m.club_id) IS NULL
          OR EXISTS (SELECT 1 FROM waiver_acceptances a JOIN waivers w ON w.id = a.waiver_id
                      WHERE a.membership_id = m.id AND w.version = (SELECT max(version) FROM waivers WHERE club_id = m.club_id)) AS waiver_current,
        tr.expires_on::text AS course_expires_on, tr.retraining_required_at IS NOT NULL AS course_retraining,
        (SELECT json_agg(json_build_object('rank', t.rank, 'expiresOn', t.expires_on::text, 'suspended', t.suspended_at IS NOT NULL, 'revoked', t.revoked_at IS NOT NULL))
           FROM member_tiers t WHERE t.membership_id = m.id AND t.confirmed_at IS NOT NULL) AS tiers
      FROM launch_event_registrations r
      JOIN memberships m ON m.id = r.membership_id JOIN users u ON u.id = m.user_id
      LEFT JOIN LATERAL (
        SELECT t.expires_on, t.retraining_required_at FROM training_records t JOIN courses c ON c.id = t.course_id
         WHERE t.membership_id = m.id AND c.club_id = m.club_id AND c.code = :course AND t.result = 'pass' AND t.confirmed_at IS NOT NULL
         ORDER BY t.trained_to DESC, t.created_at DESC LIMIT 1) tr ON true
     WHERE r.event_id = :id AND r.withdrawn_at IS NULL
     ORDER BY u.name, m.id`,
    { replacements: { id, today, graceDays: actor.club.graceDays, course: FILL_COURSE_CODE }, type: QueryTypes.SELECT })
  const levels = await useDb().query<{ rank: number, name: string, fill_cap_bar: string }>(
    'SELECT rank, name, fill_cap_bar FROM tier_levels WHERE club_id = :clubId', { replacements: { clubId }, type: QueryTypes.SELECT })
  const levelOf = new Map(levels.map(l => [l.rank, l]))
  const vessels = members.length
    ? await useDb().query<{ id: string, tag: string, name: string, owner: string, state: VesselState, construction: VesselConstruction, last_layup_on: string | null }>(
        `SELECT v.id, v.tag, v.name, v.owner_membership_id AS owner, v.state, v.construction, v.last_layup_on::text AS last_layup_on
           FROM vessels v WHERE v.club_id = :clubId AND v.state = 'in_service' AND v.owner_membership_id IN (:owners) ORDER BY v.tag`,
        { replacements: { clubId, owners: members.map(m => m.id) }, type: QueryTypes.SELECT })
    : []
  const rules = await clubVesselRules(clubId, undefined, now)
  const proofs = await loadProofFacts(vessels.map(v => v.id))
  const inService = new Map<string, LaunchRosterRowDto['vessels']>()
  for (const v of vessels) {
    const facts = proofs.get(v.id)
    if (!facts || !rules) continue
    const standing = deriveProofStanding({ state: v.state, construction: v.construction, lastLayupOn: v.last_layup_on, proofRequestedAt: null, ...facts }, rules.policy, today)
    if (standing.effectiveState !== 'in_service' || standing.ratedFillBar === null) continue
    inService.set(v.owner, [...(inService.get(v.owner) ?? []), { id: v.id, tag: v.tag, name: v.name, ratedFillBar: standing.ratedFillBar }])
  }
  const rows: LaunchRosterRowDto[] = members.map((m) => {
    const held = (m.tiers ?? []) as Pick<HeldTier, 'rank' | 'expiresOn' | 'suspended' | 'revoked'>[]
    const junior = juniorForTiers(m.birth_date, today)
    const rank = usableRank(highestValidRank(held, today), junior, event.junior_cap_rank ?? 1)
    const level = rank === null ? undefined : levelOf.get(rank)
    const tierCapBar = level ? Number(level.fill_cap_bar) : null
    const course = m.course_expires_on ? { expiresOn: m.course_expires_on, retrainingRequired: !!m.course_retraining } : null
    return {
      member: { id: m.id, name: m.name }, walkIn: m.walk_in, junior,
      tierRank: rank, tierName: level?.name ?? null, tierCapBar,
      fillLimitBar: eventFillLimitBar(tierCapBar, eventCapBar),
      vessels: inService.get(m.id) ?? [],
      missing: { waiver: !m.waiver_current, course: !isCurrentStanding(courseStanding(course, today)), dues: !m.active },
    }
  })
  return {
    event: { id: event.id, heldOn: event.held_on, site: event.site, pressureCapBar: eventCapBar, competition: event.competition, cancelled: event.cancelled },
    rows, courseName: event.course_name ?? FILL_COURSE_CODE, today,
  }
}
