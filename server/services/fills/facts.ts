import { QueryTypes, type Transaction } from 'sequelize'
import { heldFillsSql } from './reservations'
import { statusCaseSql } from '../members/status-sql'
import { POLICY_COLUMNS_SQL, deriveProofStanding, toPolicyDto, type PolicyRow } from '../vessels'
import type { VesselPolicyDto } from '#shared/types/proof-tests'
import type { MembershipStatus } from '#shared/utils/membership-status'
import type { VesselState } from '#shared/utils/vessel-states'
import { PROOF_INVALIDATING_EVENTS, type DistanceRule, type ProofInvalidatingEvent, type VesselConstruction } from '#shared/utils/vessel-arithmetic'
import { DEFAULT_JUNIOR_CAP_RANK, highestValidRank, juniorForTiers, type TierRank } from '#shared/utils/tier-rules'
import { courseStanding, isCurrentStanding } from '#shared/utils/training-validity'
import { gaugeCurrentThrough, stationLaunchLimitBar } from '#shared/utils/event-rules'
import type { FillGateFacts } from '#shared/utils/fill-gate'

interface HeldTierRow { membership_id: string, rank: TierRank, expires_on: string, suspended: boolean, revoked: boolean }

/** One row: everything one fill is decided on, for the member, vessel, event, station and caller asked. */
interface FillFactsRow extends PolicyRow {
  member_found: boolean
  status: MembershipStatus | null
  birth_date: string | null
  guardian_consent: boolean | null
  waiver_accepted: boolean | null
  held_tiers: HeldTierRow[] | null
  tiers: { rank: TierRank, fill_cap_bar: number, required_course_codes: string[] }[]
  courses: { code: string, name: string, expires_on: string | null, retraining: boolean | null }[] | null
  vessel_owner: string | null
  volume_l: string | null
  metal: boolean | null
  vessel_state: VesselState | null
  construction: VesselConstruction | null
  last_layup_on: string | null
  proof_requested_at: Date | null
  tested_on: string | null
  rated_fill_bar: string | null
  proof_events: { kind: ProofInvalidatingEvent, on: string }[] | null
  fills_since_proof: number | null
  held_on: string | null
  pressure_cap_bar: string | null
  competition: boolean | null
  cancelled: boolean | null
  rating_bar: string | null
  gauge_calibrated_on: string | null
  gauge_interval_months: number | null
  station_at_event: boolean | null
  caller_on_staff: boolean
  junior_cap_rank: number | null
}

/** What the fill check asks about. */
export interface FillSubject {
  clubId: string
  graceDays: number
  today: string
  memberId: string
  vesselId: string
  eventId: string
  stationId: string
  callerId: string
  /** Reservations of events held on or after this day still hold fills (default `today`). */
  holdsFrom?: string
  /** The device whose own reservation is not counted (a sync from it), else none. */
  deviceId?: string | null
}

/** The facts gathered for one fill, before the request's own figures are added. */
export interface GatheredFillFacts {
  /** Null when no such member in the club. */
  member: FillGateFacts['member'] | null
  tiers: FillGateFacts['tiers']
  juniorCapRank: number
  courses: FillGateFacts['courses']
  /** Null when no such vessel in the club. */
  vessel: (FillGateFacts['vessel'] & { ownerMembershipId: string, volumeL: number }) | null
  /** Null when no such event in the club. */
  event: (FillGateFacts['event'] & { cancelled: boolean }) | null
  /** Null when no such fill station in the club. */
  station: FillGateFacts['station'] | null
  callerOnStaff: boolean
  callerValidRank: TierRank | null
  distanceRule: DistanceRule
  policy: VesselPolicyDto
}

/**
 * Everything the gate decides one fill on, in ONE query (the hot path of the launch table): the
 * member (status by the SQL mirror of the status rule, the current waiver, birth date, consent), the
 * tiers the member and the caller hold, the club's tier table and vessel policy, the member's latest
 * passing record of each course, the vessel with its last passed proof, the proof-ending events after
 * it and the fills since it (plus those devices still hold: see reservations.ts), the event, the
 * station (and whether the event uses it) and whether the caller is on the event's staff. Each lookup is by key or a short index range.
 */
const FACTS_SQL = `
SELECT
  mem.id IS NOT NULL AS member_found, mem.status, mem.birth_date, mem.guardian_consent, mem.waiver_accepted,
  (SELECT json_agg(json_build_object('membership_id', t.membership_id, 'rank', t.rank, 'expires_on', t.expires_on::text,
            'suspended', t.suspended_at IS NOT NULL, 'revoked', t.revoked_at IS NOT NULL))
     FROM member_tiers t WHERE t.membership_id IN (:memberId, :callerId) AND t.club_id = :clubId AND t.confirmed_at IS NOT NULL) AS held_tiers,
  (SELECT json_agg(json_build_object('rank', l.rank, 'fill_cap_bar', l.fill_cap_bar, 'required_course_codes', l.required_course_codes) ORDER BY l.rank)
     FROM tier_levels l WHERE l.club_id = :clubId) AS tiers,
  (SELECT json_agg(json_build_object('code', c.code, 'name', c.name, 'expires_on', r.expires_on::text, 'retraining', r.retraining_required_at IS NOT NULL))
     FROM courses c LEFT JOIN LATERAL (
       SELECT expires_on, retraining_required_at FROM training_records
        WHERE membership_id = :memberId AND course_id = c.id AND result = 'pass' AND confirmed_at IS NOT NULL
        ORDER BY trained_to DESC, created_at DESC LIMIT 1) r ON true
    WHERE c.club_id = :clubId) AS courses,
  ves.owner_membership_id AS vessel_owner, ves.volume_l, ves.metal_in_pressure_path AS metal, ves.state AS vessel_state,
  ves.construction, ves.last_layup_on::text AS last_layup_on, ves.proof_requested_at,
  lp.tested_on::text AS tested_on, lp.rated_fill_bar,
  (SELECT json_agg(json_build_object('kind', e.kind, 'on', e.happened_on::text) ORDER BY e.happened_on)
     FROM vessel_events e WHERE e.vessel_id = ves.id AND e.kind IN (:kinds) AND e.happened_on > lp.tested_on) AS proof_events,
  (SELECT count(*)::int FROM fills f WHERE f.vessel_id = ves.id AND f.allowed AND f.held_on >= lp.tested_on)
    + ${heldFillsSql('ves.id')} AS fills_since_proof,
  ev.held_on::text AS held_on, ev.pressure_cap_bar, ev.competition, ev.cancelled_at IS NOT NULL AS cancelled,
  st.lowest_part_rating_bar AS rating_bar, st.gauge_calibrated_on::text AS gauge_calibrated_on, st.gauge_interval_months,
  (st.retired_at IS NULL AND EXISTS (SELECT 1 FROM launch_event_stations les WHERE les.event_id = ev.id AND les.station_id = st.id)) AS station_at_event,
  EXISTS (SELECT 1 FROM launch_event_staff s WHERE s.event_id = ev.id AND s.membership_id = :callerId) AS caller_on_staff,
  p.junior_cap_rank, ${POLICY_COLUMNS_SQL}
FROM (SELECT 1) one
LEFT JOIN LATERAL (
  SELECT m.id, ${statusCaseSql({ today: ':today', graceDays: ':graceDays' })} AS status, m.birth_date::text AS birth_date,
         m.guardian_consent_at IS NOT NULL AS guardian_consent,
         (cw.id IS NULL OR EXISTS (SELECT 1 FROM waiver_acceptances a WHERE a.waiver_id = cw.id AND a.membership_id = m.id)) AS waiver_accepted
    FROM memberships m
    LEFT JOIN LATERAL (SELECT w.id FROM waivers w WHERE w.club_id = m.club_id ORDER BY w.version DESC LIMIT 1) cw ON true
   WHERE m.id = :memberId AND m.club_id = :clubId) mem ON true
LEFT JOIN vessels ves ON ves.id = :vesselId AND ves.club_id = :clubId
LEFT JOIN LATERAL (SELECT pt.tested_on, pt.rated_fill_bar FROM proof_tests pt
   WHERE pt.vessel_id = ves.id AND pt.result = 'pass' ORDER BY pt.tested_on DESC, pt.created_at DESC LIMIT 1) lp ON true
LEFT JOIN launch_events ev ON ev.id = :eventId AND ev.club_id = :clubId
LEFT JOIN fill_stations st ON st.id = :stationId AND st.club_id = :clubId
LEFT JOIN vessel_policies p ON p.club_id = :clubId`

/** The facts of one fill (see FACTS_SQL), read inside `transaction` when given. */
export async function gatherFillFacts(s: FillSubject, transaction?: Transaction): Promise<GatheredFillFacts> {
  const [r] = await useDb().query<FillFactsRow>(FACTS_SQL, {
    replacements: { ...s, holdsFrom: s.holdsFrom ?? s.today, deviceId: s.deviceId ?? null, kinds: [...PROOF_INVALIDATING_EVENTS] }, type: QueryTypes.SELECT, transaction,
  })
  if (!r) throw new Error('the fill facts query returned no row')
  const held = (r.held_tiers ?? []).map(t => ({ ...t, expiresOn: t.expires_on }))
  const policy = toPolicyDto(r)
  const courses: Record<string, { name: string, current: boolean }> = {}
  for (const c of r.courses ?? []) {
    const standing = courseStanding(c.expires_on ? { expiresOn: c.expires_on, retrainingRequired: !!c.retraining } : null, s.today)
    courses[c.code] = { name: c.name, current: isCurrentStanding(standing) }
  }
  let vessel: GatheredFillFacts['vessel'] = null
  if (r.vessel_state && r.construction && r.vessel_owner) {
    const standing = deriveProofStanding({
      state: r.vessel_state,
      construction: r.construction,
      lastLayupOn: r.last_layup_on,
      proofRequestedAt: r.proof_requested_at ? new Date(r.proof_requested_at) : null,
      lastPass: r.tested_on ? { testedOn: r.tested_on, ratedFillBar: Number(r.rated_fill_bar) } : null,
      events: r.proof_events ?? [],
      fillsSinceProof: r.fills_since_proof ?? 0,
    }, policy, s.today)
    vessel = {
      state: standing.effectiveState,
      ratedFillBar: standing.ratedFillBar,
      metalInPressurePath: !!r.metal,
      ownerMembershipId: r.vessel_owner,
      volumeL: Number(r.volume_l),
    }
  }
  return {
    member: r.member_found
      ? {
          status: r.status!,
          waiverAccepted: !!r.waiver_accepted,
          junior: juniorForTiers(r.birth_date, s.today),
          guardianConsent: !!r.guardian_consent,
          validRank: highestValidRank(held.filter(t => t.membership_id === s.memberId), s.today),
        }
      : null,
    tiers: (r.tiers ?? []).map(t => ({ rank: t.rank, fillCapBar: Number(t.fill_cap_bar), requiredCourseCodes: t.required_course_codes })),
    juniorCapRank: r.junior_cap_rank ?? DEFAULT_JUNIOR_CAP_RANK,
    courses,
    vessel,
    event: r.held_on
      ? { heldOn: r.held_on, pressureCapBar: Number(r.pressure_cap_bar), competition: !!r.competition, cancelled: !!r.cancelled }
      : null,
    station: r.rating_bar
      ? {
          atEvent: !!r.station_at_event,
          launchLimitBar: stationLaunchLimitBar(Number(r.rating_bar), policy.equipmentFactor),
          gaugeCurrentThrough: gaugeCurrentThrough(r.gauge_calibrated_on!, r.gauge_interval_months!),
        }
      : null,
    callerOnStaff: r.caller_on_staff,
    callerValidRank: highestValidRank(held.filter(t => t.membership_id === s.callerId), s.today),
    distanceRule: policy.distanceRule,
    policy,
  }
}
