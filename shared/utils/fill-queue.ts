/**
 * The launch-side fill page's book-keeping on one device, pure: the queue of fills and refusals
 * recorded without a network, the fills this device has used of each vessel's reservation, what a
 * sync answer leaves in the queue, and whether the device may decide at all (signature, event, day).
 * The device's storage (IndexedDB) is in the page's `utils/fill-device.ts`; decisions are THE gate's.
 */
import type { FillSnapshot, FillSyncResultDto, OfflineFillItem } from '../types/fill-snapshots'
import { snapshotDay } from './fill-snapshot'

/** A queued item as the device keeps it: what it will send, the event, and a conflict once the server said so. */
export interface QueuedFill extends OfflineFillItem {
  eventId: string
  /** The server answered 409: the same client id with another body. Kept and shown to the staff. */
  conflict?: boolean
}

/** Fills of each vessel the device has recorded as allowed since its snapshot: what it has used of the reservation. */
export type UsedFills = Record<string, number>

/** `used` with one more allowed fill of `vesselId` (a refusal uses nothing). */
export function useFill(used: UsedFills, vesselId: string, allowed: boolean): UsedFills {
  return allowed ? { ...used, [vesselId]: (used[vesselId] ?? 0) + 1 } : used
}

/** The body of one queued item as the sync route takes it (the device's own fields left out). */
export function syncItem(q: QueuedFill): OfflineFillItem {
  return {
    clientId: q.clientId, recordedAt: q.recordedAt, memberId: q.memberId, vesselId: q.vesselId, stationId: q.stationId,
    pressure: q.pressure, unit: q.unit, waterVolumeL: q.waterVolumeL, supervised: q.supervised, allowed: q.allowed, reasonCodes: q.reasonCodes,
  }
}

/** How a sync went: what stays queued (unanswered items and conflicts, marked) and the tally of answers. */
export interface SyncOutcome {
  remaining: QueuedFill[]
  recorded: number
  duplicate: number
  flagged: number
  conflict: number
}

/**
 * The queue after the server's answer: items answered recorded, duplicate or flagged leave the device;
 * a conflict stays, marked, for the staff to see; an item the answer does not name stays as it was.
 */
export function applySyncResult(queue: QueuedFill[], result: FillSyncResultDto): SyncOutcome {
  const byId = new Map(result.results.map(r => [r.clientId, r]))
  const outcome: SyncOutcome = { remaining: [], recorded: 0, duplicate: 0, flagged: 0, conflict: 0 }
  for (const item of queue) {
    const answer = byId.get(item.clientId)
    if (!answer) {
      outcome.remaining.push(item)
      continue
    }
    outcome[answer.outcome]++
    if (answer.outcome === 'conflict') outcome.remaining.push({ ...item, conflict: true })
  }
  return outcome
}

/** The items still to send (conflicts are not sent again: the server has answered them). */
export function toSend(queue: QueuedFill[]): QueuedFill[] {
  return queue.filter(q => !q.conflict)
}

/** Why a device may not decide from what it holds, or null when it may. */
export type OfflineRefusal = 'no-snapshot' | 'signature' | 'other-event' | 'not-event-day'

/** Words for each refusal, for the page. */
export const OFFLINE_REFUSAL_WORDS: Record<OfflineRefusal, string> = {
  'no-snapshot': 'This device holds no facts for this event. Get it ready for the field while it has a signal.',
  'signature': 'The facts on this device fail their signature check: nothing is decided offline. Download them again with a signal.',
  'other-event': 'The facts on this device are for another event or device: nothing is decided offline.',
  'not-event-day': 'Today is not the event\'s day in the club\'s time zone: nothing is decided offline.',
}

/**
 * Whether a device may decide offline with `snapshot` (null: none held, or its signature failed:
 * `verified` false) for event `eventId` on device `deviceId` at `now`.
 */
export function offlineRefusal(o: { held: boolean, snapshot: FillSnapshot | null, eventId: string, deviceId: string | null, now: Date }): OfflineRefusal | null {
  if (!o.held) return 'no-snapshot'
  if (!o.snapshot) return 'signature'
  if (o.snapshot.event.id !== o.eventId || o.snapshot.deviceId !== o.deviceId) return 'other-event'
  if (!snapshotDay(o.snapshot, o.now).eventDay) return 'not-event-day'
  return null
}

/** "HH:MM" of instant `iso` in the club's time zone (the banner's "facts as of"). */
export function clockInZone(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone }).format(new Date(iso))
}
