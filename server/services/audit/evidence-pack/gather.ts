import { QueryTypes } from 'sequelize'
import { evidencePackPeriod, type EvidencePackQuery } from '#shared/schemas/evidence-pack'
import type { VesselPolicyDto } from '#shared/types/proof-tests'
import type { PressureUnit } from '#shared/utils/units'
import { dateInZone } from '#shared/utils/dates'
import { highestValidRank, juniorForTiers, usableRank, type TierLevel, type TierRank } from '#shared/utils/tier-rules'
import { courseStanding, isCurrentStanding } from '#shared/utils/training-validity'
import type { MembershipStatus } from '#shared/utils/membership-status'
import { POLICY_COLUMNS_SQL, toPolicyDto, type PolicyRow } from '../../vessels'
import { loadTierTable } from '../../tiers'
import { statusCaseSql } from '../../members'

/** One member in the pack: their standing, the tier they may use today and the courses they are current in. */
export interface PackMember {
  name: string
  status: MembershipStatus
  /** The highest valid tier held down to the junior cap (null: no valid tier). */
  usableRank: TierRank | null
  /** The highest valid tier held, when the junior cap holds the member below it. */
  heldAboveCap: TierRank | null
  junior: boolean
  currentCourses: string[]
}

/** A vessel in service and its last passing proof test. */
export interface PackVessel {
  tag: string
  name: string
  owner: string
  provedOn: string | null
  proofPressureBar: number | null
  ratedFillBar: number | null
  witness: string | null
}

/** A launch event in the period with its fill log counted. */
export interface PackEvent {
  heldOn: string
  site: string
  pressureCapBar: number
  cancelled: boolean
  fills: number
  supervisedFills: number
  refusals: number
}

/** An incident in the period and its outcome, without the people or any injury details. */
export interface PackIncident {
  happenedOn: string
  kind: string
  place: string
  vesselTag: string | null
  eventOn: string | null
  status: 'open' | 'closed'
  closedOn: string | null
  findings: string
  actions: string
}

/** Everything the evidence pack prints, gathered for one club and one period. */
export interface EvidencePackData {
  club: { name: string, units: PressureUnit }
  /** The club's today (YYYY-MM-DD): tiers, courses and vessels stand as on this day. */
  today: string
  from: string
  to: string
  generatedAt: Date
  policy: VesselPolicyDto
  tierLevels: TierLevel[]
  juniorCapRank: number
  courseNames: Record<string, string>
  members: PackMember[]
  vessels: PackVessel[]
  events: PackEvent[]
  incidents: PackIncident[]
}

interface ClubRow extends PolicyRow { name: string, units: PressureUnit, time_zone: string, grace_days: number }
interface MemberRow { name: string, status: MembershipStatus, birth_date: string | null, tiers: { rank: TierRank, expiresOn: string, suspended: boolean, revoked: boolean }[] | null, courses: { name: string, expiresOn: string, retraining: boolean }[] | null }
interface VesselRow { tag: string, name: string, owner: string, tested_on: string | null, pressure_bar: string | null, rated_fill_bar: string | null, witness: string | null }
interface EventRow { held_on: string, site: string, pressure_cap_bar: string, cancelled: boolean, fills: number, supervised: number, refusals: number }
interface IncidentRow { happened_on: string, kind: string, place: string, tag: string | null, event_on: string | null, status: 'open' | 'closed', closed_on: string | null, findings: string, actions: string }

/**
 * Gathers club `clubId`'s evidence pack for `q`'s period: one query for the club and its vessel
 * policy, then the tier table, members, vessels, events and incidents side by side (one query each;
 * tiers and courses per member are aggregated in the members query). Null when there is no such club.
 */
export async function gatherEvidencePack(clubId: string, q: EvidencePackQuery, now = new Date()): Promise<EvidencePackData | null> {
  const db = useDb()
  const select = <T extends object>(sql: string, replacements: Record<string, unknown>) => db.query<T>(sql, { replacements, type: QueryTypes.SELECT })
  const [club] = await select<ClubRow>(`SELECT c.name, c.units, c.time_zone, c.grace_days, ${POLICY_COLUMNS_SQL}
    FROM clubs c LEFT JOIN vessel_policies p ON p.club_id = c.id WHERE c.id = :clubId`, { clubId })
  if (!club) return null
  const today = dateInZone(now, club.time_zone)
  const { from, to } = evidencePackPeriod(q, today)
  const r = { clubId, today, from, to, graceDays: club.grace_days, tz: club.time_zone }

  const [table, memberRows, vesselRows, eventRows, incidentRows] = await Promise.all([
    loadTierTable(clubId),
    // Every approved member who has not resigned; their held tiers and latest passing record per course
    // come along as JSON, so the tier and course rules are applied once, in shared code.
    select<MemberRow>(`SELECT u.name, ${statusCaseSql({ today: ':today', graceDays: ':graceDays' })} AS status, m.birth_date::text AS birth_date,
        (SELECT json_agg(json_build_object('rank', t.rank, 'expiresOn', t.expires_on, 'suspended', t.suspended_at IS NOT NULL,
            'revoked', t.revoked_at IS NOT NULL)) FROM member_tiers t WHERE t.membership_id = m.id AND t.confirmed_at IS NOT NULL) AS tiers,
        (SELECT json_agg(json_build_object('name', l.name, 'expiresOn', l.expires_on, 'retraining', l.retraining)) FROM (
           SELECT DISTINCT ON (r.course_id) c.name, r.expires_on, r.retraining_required_at IS NOT NULL AS retraining
             FROM training_records r JOIN courses c ON c.id = r.course_id
            WHERE r.membership_id = m.id AND r.result = 'pass' AND r.confirmed_at IS NOT NULL
            ORDER BY r.course_id, r.trained_to DESC, r.created_at DESC) l) AS courses
      FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.club_id = :clubId AND m.approved_at IS NOT NULL AND m.resigned_at IS NULL
      ORDER BY lower(u.name), m.id`, r),
    select<VesselRow>(`SELECT v.tag, v.name, ou.name AS owner, pt.tested_on::text AS tested_on, pt.pressure_bar, pt.rated_fill_bar, wu.name AS witness
      FROM vessels v
      JOIN memberships om ON om.id = v.owner_membership_id JOIN users ou ON ou.id = om.user_id
      LEFT JOIN LATERAL (SELECT p.tested_on, p.pressure_bar, p.rated_fill_bar, p.witness_membership_id FROM proof_tests p
         WHERE p.vessel_id = v.id AND p.result = 'pass' ORDER BY p.tested_on DESC, p.created_at DESC LIMIT 1) pt ON true
      LEFT JOIN memberships wm ON wm.id = pt.witness_membership_id LEFT JOIN users wu ON wu.id = wm.user_id
      WHERE v.club_id = :clubId AND v.state = 'in_service'
      ORDER BY v.number`, r),
    select<EventRow>(`SELECT e.held_on::text AS held_on, e.site, e.pressure_cap_bar, e.cancelled_at IS NOT NULL AS cancelled,
        count(f.id) FILTER (WHERE f.allowed)::int AS fills,
        count(f.id) FILTER (WHERE f.allowed AND f.supervisor_membership_id IS NOT NULL)::int AS supervised,
        count(f.id) FILTER (WHERE NOT f.allowed)::int AS refusals
      FROM launch_events e LEFT JOIN fills f ON f.event_id = e.id AND f.club_id = e.club_id
      WHERE e.club_id = :clubId AND e.held_on BETWEEN CAST(:from AS date) AND CAST(:to AS date)
      GROUP BY e.id ORDER BY e.held_on, e.site, e.id`, r),
    // The period's days in the club's time zone, as a range on happened_at (the index serves it).
    select<IncidentRow>(`SELECT (i.happened_at AT TIME ZONE :tz)::date::text AS happened_on, i.kind, i.place, v.tag,
        e.held_on::text AS event_on, i.status, (i.closed_at AT TIME ZONE :tz)::date::text AS closed_on, i.findings, i.actions
      FROM incidents i LEFT JOIN vessels v ON v.id = i.vessel_id LEFT JOIN launch_events e ON e.id = i.event_id
      WHERE i.club_id = :clubId
        AND i.happened_at >= (CAST(:from AS date)::timestamp AT TIME ZONE :tz)
        AND i.happened_at < ((CAST(:to AS date) + 1)::timestamp AT TIME ZONE :tz)
      ORDER BY i.happened_at, i.id`, r),
  ])

  return {
    club: { name: club.name, units: club.units },
    today, from, to, generatedAt: now,
    policy: toPolicyDto(club),
    tierLevels: table.levels,
    juniorCapRank: table.juniorCapRank,
    courseNames: Object.fromEntries(table.courses.map(c => [c.code, c.name])),
    members: memberRows.map((m) => {
      const valid = highestValidRank(m.tiers ?? [], today)
      const junior = juniorForTiers(m.birth_date, today)
      const usable = usableRank(valid, junior, table.juniorCapRank)
      return {
        name: m.name, status: m.status, usableRank: usable, heldAboveCap: valid !== null && usable !== valid ? valid : null, junior,
        currentCourses: (m.courses ?? [])
          .filter(c => isCurrentStanding(courseStanding({ expiresOn: c.expiresOn, retrainingRequired: c.retraining }, today)))
          .map(c => c.name).sort((a, b) => a.localeCompare(b)),
      }
    }),
    vessels: vesselRows.map(v => ({
      tag: v.tag, name: v.name, owner: v.owner, provedOn: v.tested_on, witness: v.witness,
      proofPressureBar: v.pressure_bar === null ? null : Number(v.pressure_bar), ratedFillBar: v.rated_fill_bar === null ? null : Number(v.rated_fill_bar),
    })),
    events: eventRows.map(e => ({
      heldOn: e.held_on, site: e.site, pressureCapBar: Number(e.pressure_cap_bar), cancelled: e.cancelled,
      fills: e.fills, supervisedFills: e.supervised, refusals: e.refusals,
    })),
    incidents: incidentRows.map(i => ({
      happenedOn: i.happened_on, kind: i.kind, place: i.place, vesselTag: i.tag, eventOn: i.event_on, status: i.status,
      closedOn: i.closed_on, findings: i.findings, actions: i.actions,
    })),
  }
}
