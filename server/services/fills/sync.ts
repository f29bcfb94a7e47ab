import { createHash } from 'node:crypto'
import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockVessel } from '../../utils/locks'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import { MAX_LOGGED_PRESSURE_BAR, requestedPressureBar } from './gate'
import { gatherFillFacts } from './facts'
import { snapshotDevice, useReservedFill } from './reservations'
import type { OfflineFillItemInput } from '#shared/schemas/fill-snapshots'
import type { FillSyncResultDto, OfflineFillResultDto } from '#shared/types/fill-snapshots'
import { dateInZone } from '#shared/utils/dates'
import { decideFill, type FillDecision } from '#shared/utils/fill-gate'
import { fillReason, type FillReason, type FillReasonCode } from '#shared/utils/fill-reasons'
import { statusCaseSql } from '../members/status-sql'
import { rolesCan } from '#shared/utils/permissions'
import { statusKeepsRights, type MembershipStatus } from '#shared/utils/membership-status'
import { airCharge } from '#shared/utils/vessel-arithmetic'

/**
 * What makes two sends of one queued item the same: every field the device sent, in a fixed order,
 * with the event and device, hashed. The same client id with another digest is a conflict.
 */
export function offlineItemDigest(eventId: string, deviceId: string, i: OfflineFillItemInput): string {
  const canonical = [eventId, deviceId, i.clientId, new Date(i.recordedAt).toISOString(), i.memberId, i.vesselId, i.stationId,
    i.pressure, i.unit, i.waterVolumeL, i.supervised, i.allowed, [...i.reasonCodes].sort()]
  return createHash('sha256').update(JSON.stringify(canonical)).digest('hex')
}

interface StoredItem { digest: string, reasons: FillReason[], flagged: FillReason[] | null }

async function storedItem(clubId: string, clientId: string, t: Transaction): Promise<StoredItem | undefined> {
  const [row] = await useDb().query<{ client_digest: string, reasons: FillReason[], flagged_reasons: FillReason[] | null }>(
    'SELECT client_digest, reasons, flagged_reasons FROM fills WHERE club_id = :clubId AND client_id = :clientId',
    { replacements: { clubId, clientId }, type: QueryTypes.SELECT, transaction: t })
  return row && { digest: row.client_digest, reasons: row.reasons, flagged: row.flagged_reasons }
}

const codes = (reasons: readonly FillReason[]): FillReasonCode[] => reasons.map(r => r.code)

/** The answer for an item already stored: `duplicate` when the same body, else `conflict`. */
function answerStored(clientId: string, digest: string, s: StoredItem): OfflineFillResultDto {
  return s.digest === digest
    ? { clientId, outcome: 'duplicate', status: 200, reasonCodes: codes(s.flagged ?? s.reasons) }
    : { clientId, outcome: 'conflict', status: 409, reasonCodes: [] }
}

/** The device's issuer as the gate's caller on `today`: whether an instructor (roles and status that day). */
async function issuerInstructor(actor: Actor, issuerId: string, today: string, t: Transaction): Promise<boolean> {
  const [row] = await useDb().query<{ roles: string[], status: MembershipStatus }>(
    `SELECT m.roles, ${statusCaseSql({ today: ':today', graceDays: ':graceDays' })} AS status FROM memberships m WHERE m.id = :issuerId`,
    { replacements: { issuerId, today, graceDays: actor.club.graceDays }, type: QueryTypes.SELECT, transaction: t })
  return !!row && statusKeepsRights(row.status) && rolesCan(row.roles, 'training.run')
}

interface SyncContext { actor: Actor, eventId: string, deviceId: string, issuerId: string, holdsFrom: string }

/** A flagged fill's notice to every safety officer of the club (a safety kind), inside `t`. */
async function queueFlaggedNotice(c: SyncContext, fill: { id: string, vesselTag: string, site: string, heldOn: string, reasons: FillReason[] }, t: Transaction): Promise<void> {
  const officers = await useDb().query<{ id: string, email: string, name: string }>(
    `SELECT m.id, u.email, u.name FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.club_id = :clubId AND m.roles @> ARRAY['safety_officer']::text[] AND m.suspended_at IS NULL AND m.resigned_at IS NULL`,
    { replacements: { clubId: c.actor.club.id }, type: QueryTypes.SELECT, transaction: t })
  for (const o of officers) {
    await enqueueNotice({
      clubId: c.actor.club.id, membershipId: o.id, kind: 'offline_fill_flagged', subjectKey: fill.id, dueOn: clubToday(c.actor.club), toEmail: o.email,
      vars: {
        clubName: c.actor.club.name, baseUrl: clubBaseUrl(c.actor.club), memberName: o.name, eventId: c.eventId,
        eventSite: fill.site, eventDate: fill.heldOn, vesselTag: fill.vesselTag, reasonsText: fill.reasons.map(r => r.message).join(' '),
      },
    }, t)
  }
}

/**
 * One queued item, in its own transaction with its vessel locked: a known client id answers `duplicate`
 * or `conflict`; a new one is judged by THE gate with the facts as of the moment the device recorded it
 * (the caller being the device's issuer, the vessel's fills counted without this device's own unused
 * reservation) and stored: `recorded` when the server agrees with the device or the device refused it,
 * `flagged` (kept as an allowed fill with the server's reasons, and the safety officers told) when the
 * device allowed what the server refuses. An item naming what the club does not have is a `conflict`.
 */
async function syncItem(c: SyncContext, item: OfflineFillItemInput): Promise<OfflineFillResultDto> {
  const clubId = c.actor.club.id
  const digest = offlineItemDigest(c.eventId, c.deviceId, item)
  const unusable: OfflineFillResultDto = { clientId: item.clientId, outcome: 'conflict', status: 409, reasonCodes: [] }
  return inTransaction(async (t) => {
    const known = await storedItem(clubId, item.clientId, t)
    if (known) return answerStored(item.clientId, digest, known)
    const vessel = await lockVessel(clubId, item.vesselId, t)
    const requestedBar = requestedPressureBar(item)
    if (!vessel || vessel.ownerMembershipId !== item.memberId || requestedBar > MAX_LOGGED_PRESSURE_BAR) return unusable
    const recordedAt = new Date(item.recordedAt)
    const today = dateInZone(recordedAt, c.actor.club.timeZone)
    const facts = await gatherFillFacts({
      clubId, graceDays: c.actor.club.graceDays, today, memberId: item.memberId, vesselId: item.vesselId, eventId: c.eventId,
      stationId: item.stationId, callerId: c.issuerId, holdsFrom: c.holdsFrom, deviceId: c.deviceId,
    }, t)
    if (!facts.member || !facts.vessel || !facts.event || !facts.station || item.waterVolumeL >= facts.vessel.volumeL) return unusable
    const decision: FillDecision = decideFill({
      requestedBar, today, recording: true, supervised: item.supervised,
      member: facts.member, tiers: facts.tiers, juniorCapRank: facts.juniorCapRank, courses: facts.courses,
      vessel: facts.vessel, event: facts.event, station: facts.station,
      caller: {
        isMember: item.memberId === c.issuerId,
        onEventStaff: facts.callerOnStaff,
        instructor: await issuerInstructor(c.actor, c.issuerId, today, t),
        validRank: facts.callerValidRank,
      },
    })
    const flagged = item.allowed && !decision.allowed
    // A refusal on the device is stored with the server's reasons, or the device's when the server finds none.
    const reasons = item.allowed ? [] : (decision.reasons.length ? decision.reasons : item.reasonCodes.map(code => fillReason(code)))
    const charge = airCharge({ gaugePressure: item.pressure, unit: item.unit, vesselVolumeL: facts.vessel.volumeL, waterVolumeL: item.waterVolumeL, distanceRule: facts.distanceRule })
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO fills (club_id, event_id, held_on, station_id, membership_id, vessel_id, recorded_by_membership_id, supervisor_membership_id,
         pressure_bar, entered_pressure, entered_unit, water_volume_l, allowed, permitted_max_bar, limiting_factor, reasons,
         stored_energy_j, tnt_equivalent_kg, minimum_distance_m, tier_rank, client_id, device_id, recorded_offline_at, client_digest, flagged_reasons)
       VALUES (:clubId, :eventId, :heldOn, :stationId, :memberId, :vesselId, :issuerId, :supervisorId,
         :pressureBar, :pressure, :unit, :water, :allowed, :max, :factor, CAST(:reasons AS jsonb), :energy, :tnt, :distance, :tierRank,
         :clientId, :deviceId, :recordedAt, :digest, CAST(:flagged AS jsonb))
       ON CONFLICT (club_id, client_id) WHERE client_id IS NOT NULL DO NOTHING
       RETURNING id`,
      {
        replacements: {
          clubId, eventId: c.eventId, heldOn: facts.event.heldOn, stationId: item.stationId, memberId: item.memberId, vesselId: item.vesselId,
          issuerId: c.issuerId, supervisorId: item.supervised && c.issuerId !== item.memberId ? c.issuerId : null,
          pressureBar: requestedBar, pressure: item.pressure, unit: item.unit, water: item.waterVolumeL,
          allowed: item.allowed, max: decision.permittedMaxBar, factor: decision.limitingFactor, reasons: JSON.stringify(reasons),
          energy: charge.storedEnergyJ, tnt: charge.tntEquivalentKg, distance: charge.minimumDistanceM, tierRank: facts.member.validRank,
          clientId: item.clientId, deviceId: c.deviceId, recordedAt, digest, flagged: flagged ? JSON.stringify(decision.reasons) : null,
        },
        type: QueryTypes.SELECT,
        transaction: t,
      })
    if (!row) {
      // Another send of the same id got in first (it held no lock of ours): answer as it was stored.
      return answerStored(item.clientId, digest, (await storedItem(clubId, item.clientId, t))!)
    }
    if (item.allowed) await useReservedFill(c.eventId, c.deviceId, item.vesselId, t)
    if (flagged) {
      const [ev] = await useDb().query<{ site: string }>('SELECT site FROM launch_events WHERE id = :id', { replacements: { id: c.eventId }, type: QueryTypes.SELECT, transaction: t })
      await queueFlaggedNotice(c, { id: row.id, vesselTag: vessel.tag, site: ev!.site, heldOn: facts.event.heldOn, reasons: decision.reasons }, t)
    }
    return flagged
      ? { clientId: item.clientId, outcome: 'flagged', status: 201, reasonCodes: codes(decision.reasons) }
      : { clientId: item.clientId, outcome: 'recorded', status: 201, reasonCodes: codes(reasons) }
  })
}

/**
 * Takes device `deviceId`'s queue of fills recorded offline at event `eventId`, one result per item in
 * order. The caller must be on the event's staff or be the one who downloaded the device's snapshot (403
 * otherwise); 404 for no such event or no snapshot of it on that device. Each item stands alone (see
 * syncItem), so a conflict or a flag never holds back the rest, and sending the queue again records
 * nothing twice.
 */
export async function syncOfflineFills(actor: Actor, eventId: string, deviceId: string, items: readonly OfflineFillItemInput[], now = new Date()): Promise<FillSyncResultDto> {
  const [ev] = await useDb().query<{ on_staff: boolean }>(
    `SELECT EXISTS (SELECT 1 FROM launch_event_staff s WHERE s.event_id = e.id AND s.membership_id = :callerId) AS on_staff
       FROM launch_events e WHERE e.id = :eventId AND e.club_id = :clubId`,
    { replacements: { eventId, clubId: actor.club.id, callerId: actor.membership.id }, type: QueryTypes.SELECT })
  if (!ev) notFound('No such launch event')
  const device = await snapshotDevice(eventId, deviceId)
  if (!device) notFound('No snapshot of this event was issued to this device')
  if (!ev.on_staff && device.issued_by_membership_id !== actor.membership.id) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the event\'s staff or whoever downloaded the snapshot send its fills' })
  }
  const context: SyncContext = { actor, eventId, deviceId, issuerId: device.issued_by_membership_id, holdsFrom: clubToday(actor.club, now) }
  const results: OfflineFillResultDto[] = []
  for (const item of items) results.push(await syncItem(context, item))
  if (results.some(r => r.outcome === 'flagged')) kickNoticeQueue()
  return { results }
}
