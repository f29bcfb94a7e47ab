import { describe, it, expect } from 'vitest'
import { FILL_SNAPSHOT_VERSION, type FillSnapshot, type FillSnapshotKeyDto, type FillSyncResultDto } from '../../../shared/types/fill-snapshots'
import { applySyncResult, clockInZone, offlineRefusal, syncItem, toSend, useFill, type QueuedFill } from '../../../shared/utils/fill-queue'
import { verifySnapshotBytes } from '../../../shared/utils/fill-snapshot-signature'
import { fillPageManifestTransform, fillPageRoots, filesNeeded, rememberClientManifest, type ManifestChunk } from '../../../service-worker/precache'

const EVENT = '88888888-8888-4888-8888-888888888888'
const DEVICE = '77777777-7777-4777-8777-777777777777'

/** An invented snapshot for one event and device. */
function snapshot(over: Partial<FillSnapshot> = {}): FillSnapshot {
  return {
    version: FILL_SNAPSHOT_VERSION, clubId: '66666666-6666-4666-8666-666666666666', clubName: 'Test club', timeZone: 'Europe/Berlin',
    deviceId: DEVICE, issuedAt: '2026-07-03T18:05:00.000Z', issuedByMembershipId: '22222222-2222-4222-8222-222222222222',
    event: { id: EVENT, site: 'North field', heldOn: '2026-07-04', pressureCapBar: 20, competition: false },
    tiers: [], juniorCapRank: 1, courses: [], members: [], staff: [], stations: [],
    ...over,
  }
}

/** A queued fill with `n` as its client id's last digit. */
function queued(n: number, over: Partial<QueuedFill> = {}): QueuedFill {
  return {
    eventId: EVENT, clientId: `00000000-0000-4000-8000-00000000000${n}`, recordedAt: '2026-07-04T09:00:00.000Z',
    memberId: '11111111-1111-4111-8111-111111111111', vesselId: '33333333-3333-4333-8333-333333333333', stationId: '44444444-4444-4444-8444-444444444444',
    pressure: 8, unit: 'bar', waterVolumeL: 0.6, supervised: false, allowed: true, reasonCodes: [], ...over,
  }
}

const b64 = (bytes: Uint8Array) => btoa(String.fromCharCode(...bytes))

/** A fresh P-256 key pair, its public JWK, and the snapshot's bytes signed with it (base64, as the server sends them). */
async function signed(s: FillSnapshot) {
  const pair = await crypto.subtle.generateKey({ name: 'ECDSA', namedCurve: 'P-256' }, true, ['sign', 'verify']) as CryptoKeyPair
  const jwk = await crypto.subtle.exportKey('jwk', pair.publicKey)
  const bytes = new TextEncoder().encode(JSON.stringify(s))
  const signature = new Uint8Array(await crypto.subtle.sign({ name: 'ECDSA', hash: 'SHA-256' }, pair.privateKey, bytes))
  const key = { kty: 'EC', crv: 'P-256', x: jwk.x!, y: jwk.y! } as FillSnapshotKeyDto['publicKeyJwk']
  return { key, snapshot: b64(bytes), signature: b64(signature), json: JSON.stringify(s) }
}

describe('the device\'s use of its reservation (useFill)', () => {
  it.each([
    [{}, true, 1],
    [{ '33333333-3333-4333-8333-333333333333': 2 }, true, 3],
    [{ '33333333-3333-4333-8333-333333333333': 2 }, false, 2],
  ])('%o plus one fill (allowed %s) makes %i', (used, allowed, expected) => {
    expect(useFill(used, '33333333-3333-4333-8333-333333333333', allowed)['33333333-3333-4333-8333-333333333333'] ?? 0).toBe(expected)
    expect(used).toEqual({ ...used })
  })
})

describe('what a sync answer leaves on the device (applySyncResult)', () => {
  it('drops recorded, duplicate and flagged items, keeps a conflict marked and an unanswered item as it was', () => {
    const queue = [queued(1), queued(2), queued(3, { allowed: false, reasonCodes: ['TIER_CAP_EXCEEDED'] }), queued(4), queued(5)]
    const result: FillSyncResultDto = {
      results: [
        { clientId: queue[0]!.clientId, outcome: 'recorded', status: 201, reasonCodes: [] },
        { clientId: queue[1]!.clientId, outcome: 'duplicate', status: 200, reasonCodes: [] },
        { clientId: queue[2]!.clientId, outcome: 'flagged', status: 201, reasonCodes: ['TIER_CAP_EXCEEDED'] },
        { clientId: queue[3]!.clientId, outcome: 'conflict', status: 409, reasonCodes: [] },
      ],
    }
    const o = applySyncResult(queue, result)
    expect(o).toMatchObject({ recorded: 1, duplicate: 1, flagged: 1, conflict: 1 })
    expect(o.remaining).toEqual([{ ...queue[3], conflict: true }, queue[4]])
    // A conflict is answered: it is not sent again; the unanswered item is.
    expect(toSend(o.remaining).map(q => q.clientId)).toEqual([queue[4]!.clientId])
  })

  it('sends the item without the device\'s own fields', () => {
    const item = syncItem({ ...queued(1), conflict: true })
    expect(item).not.toHaveProperty('eventId')
    expect(item).not.toHaveProperty('conflict')
    expect(Object.keys(item).sort()).toEqual(['allowed', 'clientId', 'memberId', 'pressure', 'reasonCodes', 'recordedAt', 'stationId', 'supervised', 'unit', 'vesselId', 'waterVolumeL'])
  })
})

describe('whether the device may decide offline (offlineRefusal)', () => {
  const onTheDay = new Date('2026-07-04T08:00:00Z')
  it.each([
    ['no-snapshot', { held: false, snapshot: null, eventId: EVENT, deviceId: DEVICE, now: onTheDay }],
    ['signature', { held: true, snapshot: null, eventId: EVENT, deviceId: DEVICE, now: onTheDay }],
    ['other-event', { held: true, snapshot: snapshot(), eventId: '99999999-9999-4999-8999-999999999999', deviceId: DEVICE, now: onTheDay }],
    ['other-event', { held: true, snapshot: snapshot(), eventId: EVENT, deviceId: '12121212-1212-4121-8121-121212121212', now: onTheDay }],
    // 23:30 UTC on the 3rd is already the 4th in Berlin; 22:30 UTC on the 4th is the 5th there.
    [null, { held: true, snapshot: snapshot(), eventId: EVENT, deviceId: DEVICE, now: new Date('2026-07-03T23:30:00Z') }],
    ['not-event-day', { held: true, snapshot: snapshot(), eventId: EVENT, deviceId: DEVICE, now: new Date('2026-07-04T22:30:00Z') }],
    ['not-event-day', { held: true, snapshot: snapshot(), eventId: EVENT, deviceId: DEVICE, now: new Date('2026-07-03T12:00:00Z') }],
  ])('%s for %o', (expected, input) => {
    expect(offlineRefusal(input)).toBe(expected)
  })

  it('writes the banner\'s time in the club\'s time zone', () => {
    expect(clockInZone('2026-07-03T18:05:00.000Z', 'Europe/Berlin')).toBe('20:05')
    expect(clockInZone('2026-07-03T18:05:00.000Z', 'America/New_York')).toBe('14:05')
  })
})

describe('the page\'s check of the facts it holds (verifySnapshotBytes)', () => {
  it('accepts the bytes as signed, and refuses them with one digit changed or signed with another key', async () => {
    const s = snapshot()
    const good = await signed(s)
    expect(await verifySnapshotBytes(good.key, good.snapshot, good.signature)).toEqual(s)

    // One digit of the event's pressure cap (20 → 29): the signature no longer covers the bytes.
    const changed = good.json.replace('"pressureCapBar":20', '"pressureCapBar":29')
    expect(changed).not.toBe(good.json)
    const tampered = b64(new TextEncoder().encode(changed))
    expect(await verifySnapshotBytes(good.key, tampered, good.signature)).toBeNull()

    const other = await signed(s)
    expect(await verifySnapshotBytes(other.key, other.snapshot, other.signature)).toEqual(s)
    expect(await verifySnapshotBytes(good.key, good.snapshot, other.signature)).toBeNull()
    expect(await verifySnapshotBytes(other.key, good.snapshot, good.signature)).toBeNull()

    // A refused snapshot leaves the device undecided: the page says the signature failed.
    expect(offlineRefusal({ held: true, snapshot: await verifySnapshotBytes(good.key, tampered, good.signature), eventId: EVENT, deviceId: DEVICE, now: new Date('2026-07-04T08:00:00Z') })).toBe('signature')
  })
})

describe('what the fill page\'s service worker keeps (service-worker/precache.ts)', () => {
  const manifest: Record<string, ManifestChunk> = {
    'node_modules/nuxt/dist/app/entry.js': { file: 'entry.js', isEntry: true, css: ['entry.css'], assets: ['work-sans-latin-400-normal.woff2', 'work-sans-greek-400-normal.woff2'], dynamicImports: ['pages/members/index.vue', 'pages/events/[id]/fill.vue', 'layouts/default.vue'] },
    'pages/events/[id]/fill.vue': { file: 'fill.js', imports: ['_shared.js', 'node_modules/nuxt/dist/app/entry.js'], dynamicImports: ['_jsqr.js'] },
    'pages/members/index.vue': { file: 'members.js', imports: ['_shared.js', '_table.js'], dynamicImports: ['_chart.js'] },
    'layouts/default.vue': { file: 'default.js', imports: ['_shared.js'] },
    '_shared.js': { file: 'shared.js' },
    '_table.js': { file: 'table.js' },
    '_jsqr.js': { file: 'jsqr.js' },
    '_chart.js': { file: 'chart.js' },
  }

  it('follows the entry, the fill page (with its lazy parts) and its layout, not the other pages', () => {
    const { roots, page } = fillPageRoots(manifest)
    expect(page).toBe('pages/events/[id]/fill.vue')
    expect([...filesNeeded(manifest, roots, [page])].sort()).toEqual(['default.js', 'entry.css', 'entry.js', 'fill.js', 'jsqr.js', 'shared.js', 'work-sans-greek-400-normal.woff2', 'work-sans-latin-400-normal.woff2'])
  })

  it('drops every other built file and the font\'s other scripts from the precache list', async () => {
    rememberClientManifest(manifest)
    const entries = ['entry.js', 'entry.css', 'fill.js', 'jsqr.js', 'shared.js', 'default.js', 'members.js', 'table.js', 'chart.js', 'work-sans-latin-400-normal.woff2', 'work-sans-greek-400-normal.woff2', 'builds/latest.json']
      .map(f => ({ url: `_nuxt/${f}`, revision: null, size: 1 }))
      .concat([{ url: 'icons/hoopwise-192.png', revision: null, size: 1 }, { url: 'icons/hoopwise-192.png', revision: null, size: 1 }])
    const { manifest: kept } = await fillPageManifestTransform(entries)
    expect(kept.map(e => e.url).sort()).toEqual(['_nuxt/builds/latest.json', '_nuxt/default.js', '_nuxt/entry.css', '_nuxt/entry.js', '_nuxt/fill.js', '_nuxt/jsqr.js', '_nuxt/shared.js', '_nuxt/work-sans-latin-400-normal.woff2', 'icons/hoopwise-192.png'])
  })
})
