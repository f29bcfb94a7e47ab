import { randomUUID } from 'node:crypto'
import { describe, it, expect, beforeAll } from 'vitest'
import { sql } from '../../support/db'
import { api } from '../../support/http'
import { clubDay, makeFill, makeTier } from '../../support/factories'
import { check, codesOf, fillBody, fillClub, filler, otherEvent, person, type FillClub, type Filler, type Person } from './fill-support'
import { clubKey, decideOffline, downloadSnapshot, offlineItem, releaseDevice, sync, verifiedSnapshot } from './offline-support'
import { verifySnapshotBytes } from '../../../shared/utils/fill-snapshot-signature'
import { snapshotAirCharge } from '../../../shared/utils/fill-snapshot'
import type { LaunchEventDto } from '../../../shared/types/events'
import { FILL_REASON_CODES } from '../../../shared/utils/fill-reasons'

/**
 * The fill page without a network, on the server's side: the signed snapshot (facts as of the event's
 * day), the fills it reserves per device, the sync of a device's queue, and fills flagged on sync.
 */
let club: FillClub
let officer: Person

beforeAll(async () => {
  club = await fillClub()
  officer = await person(club.clubId, ['safety_officer'])
})

const allowedFillsOf = async (vesselId: string) =>
  (await sql<{ n: number }>('SELECT count(*)::int AS n FROM fills WHERE vessel_id = $1 AND allowed', [vesselId]))[0]!.n

const b64 = (bytes: Uint8Array) => Buffer.from(bytes).toString('base64')

describe('the signed snapshot', () => {
  it('verifies with the club key; one digit changed, or signed with another key, does not', async () => {
    const m = await filler(club)
    const res = await downloadSnapshot(club.instructor.cookie, club.eventId)
    expect(res.status).toBe(201)
    const key = await clubKey(club.instructor.cookie)
    expect(key).toEqual(await clubKey(m.cookie))
    expect(Buffer.from(res.body.signature, 'base64')).toHaveLength(64)
    const snapshot = await verifySnapshotBytes(key, res.body.snapshot, res.body.signature)
    expect(snapshot?.members.some(x => x.id === m.memberId)).toBe(true)

    const text = Buffer.from(res.body.snapshot, 'base64').toString('utf8')
    const changed = text.replace(/"pressureCapBar":(\d)/, (_, d: string) => `"pressureCapBar":${(Number(d) + 1) % 10}`)
    expect(changed).not.toBe(text)
    expect(changed).toHaveLength(text.length)
    expect(await verifySnapshotBytes(key, Buffer.from(changed, 'utf8').toString('base64'), res.body.signature)).toBeNull()

    const other = await crypto.subtle.generateKey({ name: 'ECDSA', namedCurve: 'P-256' }, true, ['sign', 'verify'])
    const bytes = Buffer.from(res.body.snapshot, 'base64')
    const foreign = new Uint8Array(await crypto.subtle.sign({ name: 'ECDSA', hash: 'SHA-256' }, other.privateKey, bytes))
    expect(await verifySnapshotBytes(key, res.body.snapshot, b64(foreign))).toBeNull()
    const otherJwk = await crypto.subtle.exportKey('jwk', other.publicKey)
    // The same check accepts that signature with the key that made it: the refusal above is the key's.
    expect(await verifySnapshotBytes({ kty: 'EC', crv: 'P-256', x: otherJwk.x!, y: otherJwk.y! }, res.body.snapshot, b64(foreign))).not.toBeNull()
  })

  it('holds the facts as of the event\'s day: dues and a tier that run out before a later event', async () => {
    const m = await filler(club, { rank: null, paidDays: 3 })
    await makeTier({ memberId: m.memberId, rank: 2, expiresOn: clubDay(3) })
    const eventId = await otherEvent(club, { heldOn: clubDay(7) })
    const today = await verifiedSnapshot(club.instructor.cookie, club.eventId)
    const later = await verifiedSnapshot(club.instructor.cookie, eventId)
    const inLater = later.members.find(x => x.id === m.memberId)!
    const inToday = today.members.find(x => x.id === m.memberId)!
    expect(inToday).toMatchObject({ status: 'active', validRank: 2, tiers: [{ rank: 2, expiresOn: clubDay(3) }], junior: false, waiverAccepted: true })
    expect(inLater).toMatchObject({ status: 'grace', validRank: null, tiers: [] })
    expect(inToday.courses).toMatchObject({ pressure_safety: true, rig_operator: true })
    expect(inToday.vessels).toEqual([expect.objectContaining({ id: m.vesselId, state: 'in_service', ratedFillBar: 10, reservedFills: 10 })])
    expect(today.staff).toEqual([expect.objectContaining({ membershipId: club.instructor.memberId, instructor: true, validRank: 3 })])
    expect(today.stations).toEqual([expect.objectContaining({ id: club.stationId, atEvent: true, launchLimitBar: 25 })])
    expect(today).toMatchObject({ event: { id: club.eventId, heldOn: clubDay(0), pressureCapBar: 25, competition: false }, issuedByMembershipId: club.instructor.memberId })
    expect(today.tiers.map(t => t.rank)).toEqual([0, 1, 2, 3, 4])
    // The club's distance rule: the device shows the standoff the online check answers for the same entry.
    const online = await check(club.instructor.cookie, fillBody(club, m))
    expect(online.status, JSON.stringify(online.body)).toBe(200)
    const entry = fillBody(club, m)
    expect(snapshotAirCharge(today, inToday.vessels[0]!, entry)).toEqual({ charge: online.body.airCharge })
  })

  it('only the event\'s staff with fills.record_any get one: 403 otherwise, 404 no such event, 409 cancelled or past', async () => {
    const deviceId = randomUUID()
    const body = { deviceId }
    const outsider = await person(club.clubId, ['instructor'])
    const m = await filler(club)
    const post = (as: string, eventId: string) => api(`/api/events/${eventId}/fill-snapshots`, { method: 'POST', as, body })
    expect((await post(outsider.cookie, club.eventId)).status).toBe(403)
    expect((await post(m.cookie, club.eventId)).status).toBe(403)
    expect((await post(club.instructor.cookie, randomUUID())).status).toBe(404)
    expect((await post(club.instructor.cookie, await otherEvent(club, { cancelled: true }))).status).toBe(409)
    expect((await post(club.instructor.cookie, await otherEvent(club, { heldOn: clubDay(-1) }))).status).toBe(409)
    expect((await api('/api/fill-snapshots/key')).status).toBe(401)
  })
})

describe('the sync of a device\'s queue', () => {
  it('records three fills and a refusal once each; the same queue sent again records nothing twice', async () => {
    const m = await filler(club)
    const deviceId = randomUUID()
    const s = await verifiedSnapshot(club.instructor.cookie, club.eventId, deviceId)
    const items = [0, 1, 2].map((used) => {
      const body = fillBody(club, m, { pressure: 7 + used })
      return offlineItem(body, decideOffline(s, body, { usedFills: used }))
    })
    const tooHigh = fillBody(club, m, { pressure: 12 })
    const refusal = offlineItem(tooHigh, decideOffline(s, tooHigh, { usedFills: 3 }))
    expect(refusal).toMatchObject({ allowed: false, reasonCodes: ['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED'] })
    const queue = [...items, refusal]
    const first = await sync(club.instructor.cookie, club.eventId, deviceId, queue)
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    expect(first.body.results).toEqual([
      ...items.map(i => ({ clientId: i.clientId, outcome: 'recorded', status: 201, reasonCodes: [] })),
      { clientId: refusal.clientId, outcome: 'recorded', status: 201, reasonCodes: ['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED'] },
    ])
    const again = await sync(club.instructor.cookie, club.eventId, deviceId, queue)
    expect(again.body.results.map(r => [r.outcome, r.status])).toEqual([['duplicate', 200], ['duplicate', 200], ['duplicate', 200], ['duplicate', 200]])
    const rows = await sql<{ allowed: boolean, n: number }>('SELECT allowed, count(*)::int AS n FROM fills WHERE device_id = $1 GROUP BY allowed ORDER BY allowed', [deviceId])
    expect(rows).toEqual([{ allowed: false, n: 1 }, { allowed: true, n: 3 }])
    const [used] = await sql<{ used: number }>('SELECT used FROM fill_reservations WHERE device_id = $1 AND vessel_id = $2', [deviceId, m.vesselId])
    expect(used!.used).toBe(3)
  })

  it('the same client id with another body is a 409 for that item; the others are still taken', async () => {
    const m = await filler(club)
    const deviceId = randomUUID()
    const s = await verifiedSnapshot(club.instructor.cookie, club.eventId, deviceId)
    const body = fillBody(club, m)
    const item = offlineItem(body, decideOffline(s, body))
    expect((await sync(club.instructor.cookie, club.eventId, deviceId, [item])).body.results[0]!.outcome).toBe('recorded')
    const fresh = offlineItem(body, decideOffline(s, body, { usedFills: 1 }))
    const res = await sync(club.instructor.cookie, club.eventId, deviceId, [{ ...item, pressure: 9 }, fresh])
    expect(res.status).toBe(200)
    expect(res.body.results).toEqual([
      { clientId: item.clientId, outcome: 'conflict', status: 409, reasonCodes: [] },
      { clientId: fresh.clientId, outcome: 'recorded', status: 201, reasonCodes: [] },
    ])
    expect(await allowedFillsOf(m.vesselId)).toBe(2)
  })

  it('401 signed out (nothing recorded, the device keeps its queue); 403 for a member neither on the staff nor its issuer; 404 for a device without a snapshot', async () => {
    const m = await filler(club)
    const deviceId = randomUUID()
    const s = await verifiedSnapshot(club.instructor.cookie, club.eventId, deviceId)
    const body = fillBody(club, m)
    const item = offlineItem(body, decideOffline(s, body))
    expect((await sync(undefined, club.eventId, deviceId, [item])).status).toBe(401)
    expect((await sync(m.cookie, club.eventId, deviceId, [item])).status).toBe(403)
    expect((await sync(club.instructor.cookie, club.eventId, randomUUID(), [item])).status).toBe(404)
    expect(await allowedFillsOf(m.vesselId)).toBe(0)
  })

  it('bad input is a 400: no items, more than 200, an allowed item with reasons, a device id that is not one', async () => {
    const m = await filler(club)
    const deviceId = randomUUID()
    const body = fillBody(club, m)
    const item = offlineItem(body, { allowed: true, reasons: [] })
    const post = (b: unknown) => api(`/api/events/${club.eventId}/fill-sync`, { method: 'POST', as: club.instructor.cookie, body: b })
    expect((await post({ deviceId, items: [] })).status).toBe(400)
    const many = (n: number) => Array.from({ length: n }, () => ({ ...item, clientId: randomUUID(), reasonCodes: [...FILL_REASON_CODES], allowed: false }))
    expect((await post({ deviceId, items: many(201) })).status).toBe(400)
    // 200 items with every reason code fit the route's body limit: read, then 404 (no snapshot on this device).
    expect((await post({ deviceId, items: many(200) })).status).toBe(404)
    expect((await post({ deviceId, items: [{ ...item, reasonCodes: ['PROOF_LAPSED'] }] })).status).toBe(400)
    expect((await post({ deviceId, items: [{ ...item, reasonCodes: ['NOT_A_CODE'], allowed: false }] })).status).toBe(400)
    expect((await post({ deviceId: 'not-a-device', items: [item] })).status).toBe(400)
    expect((await api(`/api/events/${club.eventId}/fill-snapshots`, { method: 'POST', as: club.instructor.cookie, body: { deviceId: 'x' } })).status).toBe(400)
  })
})

describe('reservations', () => {
  /** A member whose bottle (fill limit 10) has `fills` fills since its proof. */
  async function usedBottle(fills: number): Promise<Filler> {
    const m = await filler(club)
    for (let i = 0; i < fills; i++) await makeFill({ eventId: club.eventId, stationId: club.stationId, memberId: m.memberId, vesselId: m.vesselId })
    return m
  }

  it('two devices at one event cannot together pass a vessel\'s fill-count limit, and online fills get none of what is reserved', async () => {
    const m = await usedBottle(8)
    const [a, b] = [randomUUID(), randomUUID()]
    const sa = await verifiedSnapshot(club.instructor.cookie, club.eventId, a)
    const sb = await verifiedSnapshot(club.instructor.cookie, club.eventId, b)
    const vesselIn = (s: typeof sa) => s.members.find(x => x.id === m.memberId)!.vessels[0]!
    expect(vesselIn(sa)).toMatchObject({ state: 'in_service', reservedFills: 2 })
    expect(vesselIn(sb)).toMatchObject({ state: 'retest_due', reservedFills: null })
    // Issuing again to the same device replaces its reservation: it does not wait on itself.
    expect(vesselIn(await verifiedSnapshot(club.instructor.cookie, club.eventId, a))).toMatchObject({ reservedFills: 2 })
    const body = fillBody(club, m)
    expect(codesOf((await check(club.instructor.cookie, body)).body)).toEqual(['PROOF_LAPSED'])

    const onA = [0, 1, 2].map(used => offlineItem(body, decideOffline(sa, body, { usedFills: used })))
    expect(onA.map(i => i.allowed)).toEqual([true, true, false])
    const onB = offlineItem(body, decideOffline(sb, body))
    expect(onB.reasonCodes).toEqual(['PROOF_LAPSED'])
    const [ra, rb] = await Promise.all([sync(club.instructor.cookie, club.eventId, a, onA), sync(club.instructor.cookie, club.eventId, b, [onB])])
    expect(ra.body.results.map(r => [r.outcome, r.reasonCodes])).toEqual([['recorded', []], ['recorded', []], ['recorded', ['PROOF_LAPSED']]])
    expect(rb.body.results.map(r => [r.outcome, r.reasonCodes])).toEqual([['recorded', ['PROOF_LAPSED']]])
    expect(await allowedFillsOf(m.vesselId)).toBe(10)
  })

  it('releasing a device gives its unused fills back to online fills; releasing again changes nothing', async () => {
    const m = await usedBottle(9)
    const deviceId = randomUUID()
    await verifiedSnapshot(club.instructor.cookie, club.eventId, deviceId)
    const body = fillBody(club, m)
    expect(codesOf((await check(club.instructor.cookie, body)).body)).toEqual(['PROOF_LAPSED'])
    expect((await api('/api/fills', { method: 'POST', as: club.instructor.cookie, body })).status).toBe(422)
    expect((await releaseDevice(m.cookie, club.eventId, deviceId)).status).toBe(403)
    expect((await releaseDevice(club.instructor.cookie, club.eventId, deviceId)).status).toBe(204)
    expect((await releaseDevice(club.instructor.cookie, club.eventId, deviceId)).status).toBe(204)
    expect((await releaseDevice(club.instructor.cookie, randomUUID(), deviceId)).status).toBe(404)
    expect((await check(club.instructor.cookie, body)).body).toMatchObject({ allowed: true })
    expect((await api('/api/fills', { method: 'POST', as: club.instructor.cookie, body })).status).toBe(201)
    expect(codesOf((await check(club.instructor.cookie, body)).body)).toEqual(['PROOF_LAPSED'])
  })
})

describe('a flagged fill', () => {
  it('is kept, counts toward the vessel\'s fill limit but not toward a tier, shows on the event\'s page and tells the safety officers', async () => {
    // A T1 member with three fills this validity: a renewal needs four.
    const m = await filler(club, { rank: null })
    await makeTier({ memberId: m.memberId, rank: 1, signedOn: clubDay(-100) })
    for (let i = 0; i < 3; i++) await makeFill({ eventId: club.eventId, stationId: club.stationId, memberId: m.memberId, vesselId: m.vesselId })
    const deviceId = randomUUID()
    const s = await verifiedSnapshot(club.instructor.cookie, club.eventId, deviceId)
    const body = fillBody(club, m, { pressure: 5 })
    const decided = decideOffline(s, body, { usedFills: 0 })
    expect(decided.allowed).toBe(true)
    // After the download the member's tier is suspended: the device, offline, cannot know.
    await sql(`UPDATE member_tiers SET suspended_at = now(), suspension_reason = 'Held while a report is read', suspended_by_membership_id = $2 WHERE membership_id = $1`, [m.memberId, officer.memberId])
    const item = offlineItem(body, decided)
    const res = await sync(club.instructor.cookie, club.eventId, deviceId, [item])
    expect(res.body.results).toEqual([{ clientId: item.clientId, outcome: 'flagged', status: 201, reasonCodes: ['NO_VALID_TIER'] }])
    expect((await sync(club.instructor.cookie, club.eventId, deviceId, [item])).body.results[0]).toMatchObject({ outcome: 'duplicate', reasonCodes: ['NO_VALID_TIER'] })
    await sql('UPDATE member_tiers SET suspended_at = NULL, suspension_reason = NULL, suspended_by_membership_id = NULL WHERE membership_id = $1', [m.memberId])

    const [row] = await sql<{ id: string, allowed: boolean, codes: string[], recorded_offline_at: Date }>(
      `SELECT id, allowed, (SELECT array_agg(r->>'code') FROM jsonb_array_elements(flagged_reasons) r) AS codes, recorded_offline_at FROM fills WHERE client_id = $1`, [item.clientId])
    expect(row).toMatchObject({ allowed: true, codes: ['NO_VALID_TIER'] })
    expect(new Date(row!.recorded_offline_at).toISOString()).toBe(item.recordedAt)
    // The vessel's fill count: four since its proof, in the tally and in the gate's count alike.
    const [tally] = await sql<{ fills_since_pass: number }>('SELECT fills_since_pass FROM vessel_proof_tallies WHERE vessel_id = $1', [m.vesselId])
    expect(tally!.fills_since_pass).toBe(4)
    expect(await allowedFillsOf(m.vesselId)).toBe(4)
    // Not toward the tier: the renewal still finds three fills.
    const renewal = await api(`/api/members/${m.memberId}/tiers/1/renewal`, { method: 'POST', as: club.instructor.cookie, body: {} })
    expect(renewal.status, JSON.stringify(renewal.body)).toBe(422)
    expect(renewal.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['LOGGED_FILLS_SHORT'])
    // On the event's page, for its staff and the safety officers only.
    const page = await api<LaunchEventDto>(`/api/events/${club.eventId}`, { as: officer.cookie })
    expect(page.body.flaggedFills).toEqual(expect.arrayContaining([expect.objectContaining({
      id: row!.id, member: { id: m.memberId, name: m.name }, pressureBar: 5, recordedByName: club.instructor.name, reasons: [expect.objectContaining({ code: 'NO_VALID_TIER' })],
    })]))
    expect((await api<LaunchEventDto>(`/api/events/${club.eventId}`, { as: m.cookie })).body.flaggedFills).toBeNull()
    // A safety notice to every safety officer of the club.
    const notices = await sql<{ membership_id: string, subject: string }>(`SELECT membership_id, subject FROM notices WHERE kind = 'offline_fill_flagged' AND subject_key = $1`, [row!.id])
    expect(notices.map(n => n.membership_id)).toEqual([officer.memberId])
    expect(notices[0]!.subject).toMatch(/^Fill flagged: vessel /)
  })
})
