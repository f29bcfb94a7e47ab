import { createPrivateKey, generateKeyPairSync, sign, type KeyObject } from 'node:crypto'
import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockClubVessels } from '../../utils/locks'
import { clubToday } from '../clubs'
import { statusCaseSql } from '../members/status-sql'
import { POLICY_COLUMNS_SQL, deriveProofStanding, toPolicyDto, type PolicyRow } from '../vessels'
import { heldFillsSql, releaseDevice, reserveFills } from './reservations'
import type { FillSnapshot, FillSnapshotKeyDto, SignedFillSnapshotDto, SnapshotMember, SnapshotStaff } from '#shared/types/fill-snapshots'
import { FILL_SNAPSHOT_VERSION } from '#shared/types/fill-snapshots'
import { gaugeCurrentThrough, stationLaunchLimitBar } from '#shared/utils/event-rules'
import { rolesCan } from '#shared/utils/permissions'
import { statusKeepsRights, type MembershipStatus } from '#shared/utils/membership-status'
import { DEFAULT_JUNIOR_CAP_RANK, highestValidRank, juniorForTiers, tierCode, tierState, type TierRank } from '#shared/utils/tier-rules'
import { courseStanding, isCurrentStanding } from '#shared/utils/training-validity'
import { PROOF_INVALIDATING_EVENTS, type ProofInvalidatingEvent, type VesselConstruction } from '#shared/utils/vessel-arithmetic'
import type { VesselState } from '#shared/utils/vessel-states'

type PublicJwk = FillSnapshotKeyDto['publicKeyJwk']

/**
 * Club `clubId`'s snapshot signing key, made on first need: a fresh ECDSA P-256 pair is offered with
 * INSERT … ON CONFLICT DO NOTHING and the stored one read back, so two first requests at once agree.
 */
export async function clubSigningKey(clubId: string, transaction?: Transaction): Promise<{ publicJwk: PublicJwk, privateKey: KeyObject }> {
  const read = async () => (await useDb().query<{ public_jwk: PublicJwk, private_pkcs8: string }>(
    'SELECT public_jwk, private_pkcs8 FROM club_signing_keys WHERE club_id = :clubId',
    { replacements: { clubId }, type: QueryTypes.SELECT, transaction }))[0]
  let row = await read()
  if (!row) {
    const pair = generateKeyPairSync('ec', { namedCurve: 'prime256v1' })
    const jwk = pair.publicKey.export({ format: 'jwk' })
    const publicJwk: PublicJwk = { kty: 'EC', crv: 'P-256', x: jwk.x!, y: jwk.y! }
    const pkcs8 = pair.privateKey.export({ format: 'der', type: 'pkcs8' }).toString('base64')
    await useDb().query(
      `INSERT INTO club_signing_keys (club_id, public_jwk, private_pkcs8) VALUES (:clubId, CAST(:jwk AS jsonb), :pkcs8)
       ON CONFLICT (club_id) DO NOTHING`,
      { replacements: { clubId, jwk: JSON.stringify(publicJwk), pkcs8 }, transaction })
    row = await read()
  }
  const privateKey = createPrivateKey({ key: Buffer.from(row!.private_pkcs8, 'base64'), format: 'der', type: 'pkcs8' })
  return { publicJwk: { kty: 'EC', crv: 'P-256', x: row!.public_jwk.x, y: row!.public_jwk.y }, privateKey }
}

/** The caller's club's public key for snapshots. */
export async function snapshotKey(actor: Actor): Promise<FillSnapshotKeyDto> {
  return { clubId: actor.club.id, publicKeyJwk: (await clubSigningKey(actor.club.id)).publicJwk }
}

/** The exact bytes of `snapshot` as sent, and the club key's IEEE P1363 signature over them (both base64). */
export function signSnapshot(snapshot: FillSnapshot, privateKey: KeyObject): SignedFillSnapshotDto {
  const bytes = Buffer.from(JSON.stringify(snapshot), 'utf8')
  const signature = sign('sha256', bytes, { key: privateKey, dsaEncoding: 'ieee-p1363' })
  return { snapshot: bytes.toString('base64'), signature: signature.toString('base64') }
}

interface EventRow { id: string, site: string, held_on: string, pressure_cap_bar: string, competition: boolean, cancelled: boolean, on_staff: boolean }
interface MemberRow { id: string, name: string, status: MembershipStatus, birth_date: string | null, guardian_consent: boolean, waiver_accepted: boolean, roles: string[], fill_pass_id: string | null, resigned: boolean }
interface TierRow { membership_id: string, rank: TierRank, expires_on: string, suspended: boolean, revoked: boolean }
interface VesselRow {
  id: string
  tag: string
  owner_membership_id: string
  state: VesselState
  construction: VesselConstruction
  last_layup_on: string | null
  proof_requested_at: Date | null
  volume_l: string
  metal: boolean
  tested_on: string | null
  rated_fill_bar: string | null
  events: { kind: ProofInvalidatingEvent, on: string }[] | null
  fills: number
  held: number
}

/** The event `eventId` of the club, with whether `callerId` is on its staff, or undefined. */
async function loadEvent(clubId: string, eventId: string, callerId: string, t: Transaction): Promise<EventRow | undefined> {
  const [row] = await useDb().query<EventRow>(
    `SELECT e.id, e.site, e.held_on::text AS held_on, e.pressure_cap_bar, e.competition, e.cancelled_at IS NOT NULL AS cancelled,
       EXISTS (SELECT 1 FROM launch_event_staff s WHERE s.event_id = e.id AND s.membership_id = :callerId) AS on_staff
     FROM launch_events e WHERE e.id = :eventId AND e.club_id = :clubId`,
    { replacements: { clubId, eventId, callerId }, type: QueryTypes.SELECT, transaction: t })
  return row
}

/**
 * Every fact of the snapshot, as of the event's day `heldOn`, in eight queries whatever the club's size:
 * the members (status by the SQL mirror of the status rule for that day; resigned ones are left out but
 * still read for the staff), their confirmed tiers, their latest passing confirmed record of each course,
 * their vessels that may still be filled with the last passed proof, the proof-ending events after it,
 * the fills since it and those other devices hold; the tier table, the courses, the policy, the staff and
 * the club's fill stations.
 */
async function gatherSnapshotFacts(actor: Actor, ev: EventRow, deviceId: string, holdsFrom: string, t: Transaction) {
  const clubId = actor.club.id
  const heldOn = ev.held_on
  const q = <T extends object>(sql: string, replacements: Record<string, unknown> = {}) =>
    useDb().query<T>(sql, { replacements: { clubId, heldOn, ...replacements }, type: QueryTypes.SELECT, transaction: t })
  const [members, tiers, courseRecords, vessels, levels, courses, policyRows, staffIds, stations] = await Promise.all([
    q<MemberRow>(`
      WITH cw AS (SELECT w.id FROM waivers w WHERE w.club_id = :clubId ORDER BY w.version DESC LIMIT 1)
      SELECT m.id, u.name, ${statusCaseSql({ today: ':heldOn', graceDays: ':graceDays' })} AS status, m.birth_date::text AS birth_date,
             m.guardian_consent_at IS NOT NULL AS guardian_consent, m.roles, m.resigned_at IS NOT NULL AS resigned,
             (cw.id IS NULL OR EXISTS (SELECT 1 FROM waiver_acceptances a WHERE a.waiver_id = cw.id AND a.membership_id = m.id)) AS waiver_accepted,
             (SELECT p.id FROM fill_passes p WHERE p.membership_id = m.id AND p.replaced_at IS NULL
                 AND (p.expires_at AT TIME ZONE :tz)::date > CAST(:heldOn AS date)) AS fill_pass_id
        FROM memberships m JOIN users u ON u.id = m.user_id LEFT JOIN cw ON true
       WHERE m.club_id = :clubId ORDER BY u.name, m.id`, { graceDays: actor.club.graceDays, tz: actor.club.timeZone }),
    q<TierRow>(`SELECT t.membership_id, t.rank, t.expires_on::text AS expires_on, t.suspended_at IS NOT NULL AS suspended, t.revoked_at IS NOT NULL AS revoked
        FROM member_tiers t WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL`),
    q<{ membership_id: string, code: string, expires_on: string | null, retraining: boolean }>(`
      SELECT DISTINCT ON (r.membership_id, r.course_id) r.membership_id, c.code, r.expires_on::text AS expires_on,
             r.retraining_required_at IS NOT NULL AS retraining
        FROM training_records r JOIN courses c ON c.id = r.course_id
       WHERE c.club_id = :clubId AND r.result = 'pass' AND r.confirmed_at IS NOT NULL
       ORDER BY r.membership_id, r.course_id, r.trained_to DESC, r.created_at DESC`),
    q<VesselRow>(`
      SELECT v.id, v.tag, v.owner_membership_id, v.state, v.construction, v.last_layup_on::text AS last_layup_on, v.proof_requested_at,
             v.volume_l, v.metal_in_pressure_path AS metal, lp.tested_on::text AS tested_on, lp.rated_fill_bar,
             (SELECT json_agg(json_build_object('kind', e.kind, 'on', e.happened_on::text) ORDER BY e.happened_on)
                FROM vessel_events e WHERE e.vessel_id = v.id AND e.kind IN (:kinds) AND e.happened_on > lp.tested_on) AS events,
             (SELECT count(*)::int FROM fills f WHERE f.vessel_id = v.id AND f.allowed AND f.held_on >= lp.tested_on) AS fills,
             ${heldFillsSql('v.id')} AS held
        FROM vessels v JOIN memberships m ON m.id = v.owner_membership_id AND m.resigned_at IS NULL
        LEFT JOIN LATERAL (SELECT p.tested_on, p.rated_fill_bar FROM proof_tests p
           WHERE p.vessel_id = v.id AND p.result = 'pass' ORDER BY p.tested_on DESC, p.created_at DESC LIMIT 1) lp ON true
       WHERE v.club_id = :clubId AND v.state NOT IN ('retired', 'failed') ORDER BY v.tag`,
    { kinds: [...PROOF_INVALIDATING_EVENTS], holdsFrom, eventId: ev.id, deviceId }),
    q<{ rank: TierRank, name: string, fill_cap_bar: string, required_course_codes: string[] }>(
      'SELECT rank, name, fill_cap_bar, required_course_codes FROM tier_levels WHERE club_id = :clubId ORDER BY rank'),
    q<{ code: string, name: string }>('SELECT code, name FROM courses WHERE club_id = :clubId ORDER BY code'),
    q<PolicyRow & { junior_cap_rank: number | null }>(`SELECT p.junior_cap_rank, ${POLICY_COLUMNS_SQL} FROM (SELECT 1) one LEFT JOIN vessel_policies p ON p.club_id = :clubId`),
    q<{ membership_id: string }>('SELECT membership_id FROM launch_event_staff WHERE event_id = :eventId', { eventId: ev.id }),
    q<{ id: string, name: string, rating_bar: string, gauge_calibrated_on: string, gauge_interval_months: number, at_event: boolean }>(`
      SELECT st.id, st.name, st.lowest_part_rating_bar AS rating_bar, st.gauge_calibrated_on::text AS gauge_calibrated_on, st.gauge_interval_months,
             EXISTS (SELECT 1 FROM launch_event_stations les WHERE les.event_id = :eventId AND les.station_id = st.id) AS at_event
        FROM fill_stations st WHERE st.club_id = :clubId AND st.retired_at IS NULL ORDER BY st.name`, { eventId: ev.id }),
  ])
  return { members, tiers, courseRecords, vessels, levels, courses, policyRow: policyRows[0]!, staffIds, stations }
}

/** Groups `rows` by `key`. */
function groupBy<T>(rows: readonly T[], key: (r: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>()
  for (const r of rows) {
    const list = out.get(key(r))
    if (list) list.push(r)
    else out.set(key(r), [r])
  }
  return out
}

/**
 * The snapshot of event `ev` for device `deviceId`, facts as of the event's day, and the fills it
 * reserves for the device (vessel id → fills): each vessel's fill-count limit less the fills since its
 * proof and those other devices hold.
 */
async function buildSnapshot(actor: Actor, ev: EventRow, deviceId: string, holdsFrom: string, t: Transaction): Promise<{ snapshot: FillSnapshot, reserved: Map<string, number> }> {
  const heldOn = ev.held_on
  const f = await gatherSnapshotFacts(actor, ev, deviceId, holdsFrom, t)
  const policy = toPolicyDto(f.policyRow)
  const tiersBy = groupBy(f.tiers.map(r => ({ ...r, expiresOn: r.expires_on })), r => r.membership_id)
  const coursesBy = groupBy(f.courseRecords, r => r.membership_id)
  const vesselsBy = groupBy(f.vessels, r => r.owner_membership_id)
  const reserved = new Map<string, number>()
  const validRankOf = (id: string) => highestValidRank(tiersBy.get(id) ?? [], heldOn)
  const members: SnapshotMember[] = f.members.filter(m => !m.resigned).map((m) => {
    const courses: Record<string, boolean> = {}
    for (const c of coursesBy.get(m.id) ?? []) {
      courses[c.code] = isCurrentStanding(courseStanding(c.expires_on ? { expiresOn: c.expires_on, retrainingRequired: c.retraining } : null, heldOn))
    }
    return {
      id: m.id,
      name: m.name,
      status: m.status,
      waiverAccepted: m.waiver_accepted,
      junior: juniorForTiers(m.birth_date, heldOn),
      guardianConsent: m.guardian_consent,
      tiers: (tiersBy.get(m.id) ?? []).filter(r => tierState(r, heldOn) === 'valid').sort((a, b) => a.rank - b.rank)
        .map(r => ({ rank: r.rank, expiresOn: r.expires_on })),
      validRank: validRankOf(m.id),
      courses,
      fillPassId: m.fill_pass_id,
      vessels: (vesselsBy.get(m.id) ?? []).map((v) => {
        const standing = deriveProofStanding({
          state: v.state,
          construction: v.construction,
          lastLayupOn: v.last_layup_on,
          proofRequestedAt: v.proof_requested_at ? new Date(v.proof_requested_at) : null,
          lastPass: v.tested_on ? { testedOn: v.tested_on, ratedFillBar: Number(v.rated_fill_bar) } : null,
          events: v.events ?? [],
          fillsSinceProof: v.fills + v.held,
        }, policy, heldOn)
        const reservedFills = standing.effectiveState === 'in_service' ? standing.fillsRemaining : null
        if (reservedFills) reserved.set(v.id, reservedFills)
        return {
          id: v.id,
          tag: v.tag,
          ownerMembershipId: v.owner_membership_id,
          state: standing.effectiveState as FillSnapshot['members'][number]['vessels'][number]['state'],
          ratedFillBar: standing.ratedFillBar,
          metalInPressurePath: v.metal,
          volumeL: Number(v.volume_l),
          reservedFills,
        }
      }),
    }
  })
  const byId = new Map(f.members.map(m => [m.id, m]))
  const staff: SnapshotStaff[] = f.staffIds.flatMap(({ membership_id: id }) => {
    const m = byId.get(id)
    if (!m) return []
    // The gate's caller is an instructor when their roles hold training.run and their status keeps rights (actorCan).
    return [{ membershipId: id, name: m.name, instructor: statusKeepsRights(m.status) && rolesCan(m.roles, 'training.run'), validRank: validRankOf(id) }]
  })
  const snapshot: FillSnapshot = {
    version: FILL_SNAPSHOT_VERSION,
    clubId: actor.club.id,
    clubName: actor.club.name,
    timeZone: actor.club.timeZone,
    deviceId,
    issuedAt: new Date().toISOString(),
    issuedByMembershipId: actor.membership.id,
    event: { id: ev.id, site: ev.site, heldOn, pressureCapBar: Number(ev.pressure_cap_bar), competition: ev.competition },
    tiers: f.levels.map(l => ({ rank: l.rank, code: tierCode(l.rank), name: l.name, fillCapBar: Number(l.fill_cap_bar), requiredCourseCodes: l.required_course_codes })),
    juniorCapRank: f.policyRow.junior_cap_rank ?? DEFAULT_JUNIOR_CAP_RANK,
    distanceRule: policy.distanceRule,
    courses: f.courses,
    members,
    staff,
    stations: f.stations.map(st => ({
      id: st.id,
      name: st.name,
      atEvent: st.at_event,
      launchLimitBar: stationLaunchLimitBar(Number(st.rating_bar), policy.equipmentFactor),
      gaugeCurrentThrough: gaugeCurrentThrough(st.gauge_calibrated_on, st.gauge_interval_months),
    })),
  }
  return { snapshot, reserved }
}

/**
 * Issues event `eventId`'s signed snapshot for device `deviceId` to `actor` (on the event's staff, with
 * fills.record_any): 404 no such event, 409 cancelled or already past, 403 not on its staff. Inside one
 * transaction with every fillable vessel of the club locked, it reserves for the device each vessel's
 * remaining fills (replacing the device's earlier reservation at the event), so no online fill or other
 * device counts them meanwhile.
 */
export async function issueSnapshot(actor: Actor, eventId: string, deviceId: string, now = new Date()): Promise<SignedFillSnapshotDto> {
  const today = clubToday(actor.club, now)
  const key = await clubSigningKey(actor.club.id)
  const snapshot = await inTransaction(async (t) => {
    const ev = await loadEvent(actor.club.id, eventId, actor.membership.id, t)
    if (!ev) notFound('No such launch event')
    if (ev.cancelled) conflict('This event was cancelled: there is nothing to fill at it.')
    if (ev.held_on < today) conflict('This event is over: a snapshot is for an event today or to come.')
    if (!ev.on_staff) throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the event\'s staff download its snapshot' })
    await lockClubVessels(actor.club.id, t)
    const built = await buildSnapshot(actor, ev, deviceId, today, t)
    await reserveFills({ clubId: actor.club.id, eventId, deviceId, issuedBy: actor.membership.id, reserved: built.reserved }, t)
    return built.snapshot
  })
  return signSnapshot(snapshot, key.privateKey)
}

/**
 * Releases device `deviceId`'s reservation at event `eventId` for `actor` (on the event's staff, or the
 * one who downloaded it): 404 no such event; nothing to do is not an error.
 */
export async function releaseSnapshotDevice(actor: Actor, eventId: string, deviceId: string): Promise<void> {
  const [ev] = await useDb().query<{ on_staff: boolean, issuer: boolean }>(
    `SELECT EXISTS (SELECT 1 FROM launch_event_staff s WHERE s.event_id = e.id AND s.membership_id = :callerId) AS on_staff,
            EXISTS (SELECT 1 FROM fill_snapshot_devices d WHERE d.event_id = e.id AND d.device_id = :deviceId
                       AND d.issued_by_membership_id = :callerId) AS issuer
       FROM launch_events e WHERE e.id = :eventId AND e.club_id = :clubId`,
    { replacements: { eventId, deviceId, clubId: actor.club.id, callerId: actor.membership.id }, type: QueryTypes.SELECT })
  if (!ev) notFound('No such launch event')
  if (!ev.on_staff && !ev.issuer) throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the event\'s staff release a device' })
  await releaseDevice(eventId, deviceId)
}
