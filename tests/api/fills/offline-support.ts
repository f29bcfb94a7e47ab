// The fill page's side of the offline routes, as the page does it: the club key, a snapshot downloaded
// for a device and verified with the shared Web Crypto check, a decision by THE gate from it, a sync.
import { randomUUID } from 'node:crypto'
import { expect } from 'vitest'
import { api } from '../../support/http'
import type { FillBody } from './fill-support'
import type { FillSnapshot, FillSnapshotKeyDto, FillSyncResultDto, OfflineFillItem, SignedFillSnapshotDto } from '../../../shared/types/fill-snapshots'
import { decideFromSnapshot, snapshotDay } from '../../../shared/utils/fill-snapshot'
import { verifySnapshotBytes } from '../../../shared/utils/fill-snapshot-signature'
import type { FillDecision } from '../../../shared/utils/fill-gate'

/** GET /api/fill-snapshots/key as `as`. */
export async function clubKey(as: string): Promise<FillSnapshotKeyDto['publicKeyJwk']> {
  const res = await api<FillSnapshotKeyDto>('/api/fill-snapshots/key', { as })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body.publicKeyJwk
}

/** POST /api/events/[id]/fill-snapshots as `as` for `deviceId` (a new device when absent). */
export function downloadSnapshot(as: string, eventId: string, deviceId: string = randomUUID()) {
  return api<SignedFillSnapshotDto>(`/api/events/${eventId}/fill-snapshots`, { method: 'POST', as, body: { deviceId } })
}

/** A snapshot downloaded for `deviceId` and verified with the club's key as the page does it (fails the test otherwise). */
export async function verifiedSnapshot(as: string, eventId: string, deviceId: string = randomUUID()): Promise<FillSnapshot> {
  const res = await downloadSnapshot(as, eventId, deviceId)
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const snapshot = await verifySnapshotBytes(await clubKey(as), res.body.snapshot, res.body.signature)
  expect(snapshot, 'the snapshot verifies with the club key').not.toBeNull()
  return snapshot!
}

/** DELETE /api/events/[id]/fill-snapshots/[deviceId] as `as`. */
export function releaseDevice(as: string, eventId: string, deviceId: string) {
  return api(`/api/events/${eventId}/fill-snapshots/${deviceId}`, { method: 'DELETE', as })
}

/** THE gate's decision from the snapshot on the fill `body` (the device's today), failing the test when the snapshot lacks something. */
export function decideOffline(s: FillSnapshot, body: FillBody, o: { usedFills?: number, callerId?: string, callerInstructor?: boolean } = {}): FillDecision {
  const pressureBar = body.unit === 'bar' ? body.pressure : NaN
  const r = decideFromSnapshot(s, {
    memberId: body.memberId, vesselId: body.vesselId, stationId: body.stationId, requestedBar: pressureBar, supervised: body.supervised ?? false,
    today: snapshotDay(s, new Date()).today, usedFills: o.usedFills ?? 0, callerId: o.callerId, callerInstructor: o.callerInstructor,
  })
  if ('missing' in r) throw new Error(`the snapshot lacks the ${r.missing}`)
  return r.decision
}

/** A queued item of the fill `body` as the device decided it, recorded now. */
export function offlineItem(body: FillBody, decision: Pick<FillDecision, 'allowed' | 'reasons'>, o: Partial<OfflineFillItem> = {}): OfflineFillItem {
  return {
    clientId: randomUUID(), recordedAt: new Date().toISOString(), memberId: body.memberId, vesselId: body.vesselId, stationId: body.stationId,
    pressure: body.pressure, unit: body.unit, waterVolumeL: body.waterVolumeL, supervised: body.supervised ?? false,
    allowed: decision.allowed, reasonCodes: decision.reasons.map(r => r.code), ...o,
  }
}

/** POST /api/events/[id]/fill-sync as `as` (anonymous when undefined). */
export function sync(as: string | undefined, eventId: string, deviceId: string, items: OfflineFillItem[]) {
  return api<FillSyncResultDto>(`/api/events/${eventId}/fill-sync`, { method: 'POST', as, body: { deviceId, items } })
}
