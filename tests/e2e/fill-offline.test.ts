import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../scripts/lib/config.mjs'
import { CHROMIUM_ARGS } from '../support/browser'
import { sql } from '../support/db'
import { serverEnv } from '../support/test-env'
import { clubDay, makeFillStation, makeLaunchEvent, makeMember, makeProofTest, makeTier, makeTrainingRecord, makeVessel } from '../support/factories'

// The browser's own offline mode does not cut a service worker's requests, so this file runs an app
// server of its own (on the shared test database) that it stops and starts again.
const appPort = TEST.spareBase + 15
const baseUrl = `http://127.0.0.1:${appPort}`
const env = serverEnv({ NUXT_PUBLIC_URL: baseUrl })
let server: Awaited<ReturnType<typeof startAppServer>> | undefined
let browser: Browser
let context: BrowserContext

/** The content-security-policy complaints `page` meets from now on. */
function policyComplaints(page: Page): string[] {
  const seen: string[] = []
  page.on('console', (m) => {
    if (/Content Security Policy|Refused to/i.test(m.text())) seen.push(m.text())
  })
  return seen
}

/** Opens `path` and waits until the app has hydrated. */
async function open(page: Page, path: string) {
  await page.goto(`${baseUrl}${path}`)
  await page.waitForFunction(() => (window as unknown as { useNuxtApp?: () => { isHydrating: boolean } }).useNuxtApp?.().isHydrating === false)
}

/** The event's fills of `vesselId` in the log: allowed and refused. */
async function logged(vesselId: string) {
  const rows = await sql<{ allowed: boolean, n: string }>('SELECT allowed, count(*) AS n FROM fills WHERE vessel_id = $1 GROUP BY allowed', [vesselId])
  return { allowed: Number(rows.find(r => r.allowed)?.n ?? 0), refused: Number(rows.find(r => !r.allowed)?.n ?? 0) }
}

/** The device's queue for the event, read straight from IndexedDB. */
const deviceQueue = (page: Page) => page.evaluate(() => new Promise<unknown[]>((resolve, reject) => {
  const req = indexedDB.open('hoopwise-fill')
  req.onerror = () => reject(req.error)
  req.onsuccess = () => {
    const all = req.result.transaction('queue').objectStore('queue').getAll()
    all.onsuccess = () => resolve(all.result)
  }
}))

/**
 * Changes one digit of the held snapshot of `eventId` (the first of the event's pressure cap; the signature
 * left as it was), or puts `restore` back; returns the bytes it held before (base64).
 */
const editHeldSnapshot = (page: Page, eventId: string, restore?: string) => page.evaluate(([id, original]) => new Promise<string>((resolve, reject) => {
  const req = indexedDB.open('hoopwise-fill')
  req.onerror = () => reject(req.error)
  req.onsuccess = () => {
    const store = req.result.transaction('snapshots', 'readwrite').objectStore('snapshots')
    const get = store.get(id)
    get.onsuccess = () => {
      const held = get.result
      const before = held.snapshot as string
      if (original) held.snapshot = original
      else {
        const json = new TextDecoder().decode(Uint8Array.from(atob(before), c => c.charCodeAt(0)))
        const changed = json.replace(/("pressureCapBar":)(\d)/, (_, key: string, digit: string) => `${key}${(Number(digit) + 1) % 10}`)
        if (changed === json) return reject(new Error('no digit to change'))
        // In slices: the club's facts run to megabytes, past what one call may take as arguments (a throw
        // in this callback would leave the promise unsettled and the test hanging).
        const bytes = new TextEncoder().encode(changed)
        let binary = ''
        for (let i = 0; i < bytes.length; i += 0x8000) binary += String.fromCharCode(...bytes.subarray(i, i + 0x8000))
        held.snapshot = btoa(binary)
      }
      store.put(held).onsuccess = () => resolve(before)
    }
  }
}), [eventId, restore ?? null] as const)

/** Records one fill on the offline form and waits until the queue holds `queued` items. */
async function recordOffline(page: Page, o: { memberId: string, tag: string, stationName: string, pressureBar: string, queued: number }) {
  await page.getByTestId('fill-member').selectOption(o.memberId)
  await page.getByTestId('fill-tag').fill(o.tag)
  await page.getByTestId('fill-tag-find').click()
  await page.getByTestId(`fill-station-${o.stationName}`).check()
  await page.getByTestId('fill-unit-bar').check()
  await page.getByTestId('fill-pressure').fill(o.pressureBar)
  await page.getByTestId('fill-water').fill('0.6')
  await page.getByTestId('fill-record').click()
  await expect.poll(() => page.getByTestId('fill-queue-count').getAttribute('data-count')).toBe(String(o.queued))
}

describe('the fill page at a field without a signal', () => {
  beforeAll(async () => {
    server = await startAppServer({ root: ROOT, port: appPort, env })
    browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS })
    context = await browser.newContext({ viewport: { width: 360, height: 740 }, isMobile: true, hasTouch: true })
  })

  afterAll(async () => {
    await context?.close()
    await browser?.close()
    await server?.stop()
  })

  it('works from its service worker with the server stopped: three fills and a refusal kept, sent once when it is back, and not twice', async () => {
    const staff = await makeMember({ roles: ['instructor'] })
    const member = await makeMember({ birthDate: '1985-06-01', acceptWaiver: true })
    await makeTier({ memberId: member.memberId, rank: 1, assessorId: staff.memberId, signedOn: clubDay(-200) })
    await makeTier({ memberId: member.memberId, rank: 2, assessorId: staff.memberId, signedOn: clubDay(-20) })
    for (const course of ['safety_briefing', 'pressure_safety', 'rig_operator']) {
      await makeTrainingRecord({ memberId: member.memberId, course, trainerId: staff.memberId, trainedOn: clubDay(-30) })
    }
    const vessel = await makeVessel({ ownerId: member.memberId, state: 'in_service', name: 'Field Kestrel', volumeL: 2 })
    await makeProofTest({ vesselId: vessel.vesselId, witnessId: staff.memberId, testedOn: clubDay(-10), pressureBar: 21 })
    const station = await makeFillStation({ name: `Pad ${vessel.tag}` })
    const { eventId } = await makeLaunchEvent({ createdBy: staff.memberId, stationIds: [station.stationId], registeredIds: [member.memberId], staffIds: [staff.memberId], site: 'Far flat' })
    const fillPath = `/events/${eventId}/fill`

    const page = await context.newPage()
    const complaints = policyComplaints(page)
    // Signed in as the event's staff, online: the page registers its worker and the device gets ready.
    await open(page, `/login?next=${encodeURIComponent(fillPath)}`)
    await page.getByTestId('field-email').fill(staff.email)
    await page.getByTestId('field-password').fill(staff.password)
    await page.getByTestId('login-submit').click()
    await page.waitForURL(url => url.pathname !== '/login')
    await open(page, fillPath)
    await page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, { timeout: 30_000 })
    await page.getByTestId('fill-get-ready').click()
    await expect.poll(() => page.getByTestId('fill-ready-state').textContent()).toMatch(/holds the event's facts as of \d\d:\d\d/)

    // What the worker keeps: no page with personal data; the shell holds nobody's name.
    const kept = await page.evaluate(async () => {
      const names = (await caches.keys()).filter(n => n.startsWith('hoopwise-fill-'))
      const cache = await caches.open(names[0]!)
      const urls = (await cache.keys()).map(r => new URL(r.url).pathname)
      return { names, urls, shell: await (await cache.match('/events/_/fill'))!.text() }
    })
    expect(kept.names).toHaveLength(1)
    expect(kept.urls.filter(u => !/^\/(_nuxt\/|icons\/|favicon\.svg$|manifest\.webmanifest$|events\/_\/fill$|api\/fill-snapshots\/key$)/.test(u))).toEqual([])
    expect(kept.shell).toContain('nonce=')
    for (const name of [staff.name, member.name, vessel.tag]) expect(kept.shell).not.toContain(name)

    // The server goes away; the page comes back from the worker, decides from the signed facts.
    await server!.stop()
    server = undefined
    await open(page, fillPath)
    await expect.poll(async () => (await page.getByTestId('fill-offline-banner').textContent())?.replace(/\s+/g, ' ')).toMatch(/Offline — facts as of \d\d:\d\d/)
    expect(await page.getByTestId('fill-cautions').isVisible()).toBe(true)

    // One digit changed in the held facts: refused, and said why; put back, it decides again.
    const original = await editHeldSnapshot(page, eventId)
    await open(page, fillPath)
    await expect.poll(() => page.getByTestId('fill-offline-refusal').getAttribute('data-refusal')).toBe('signature')
    expect(await page.getByTestId('fill-offline-form').count()).toBe(0)
    await editHeldSnapshot(page, eventId, original)
    await open(page, fillPath)
    await page.getByTestId('fill-offline-form').waitFor()

    for (let i = 1; i <= 3; i++) {
      await recordOffline(page, { memberId: member.memberId, tag: vessel.tag, stationName: station.name, pressureBar: '8', queued: i })
      expect(await page.getByTestId('fill-verdict-word').textContent()).toBe('GO')
    }
    // The standoff beside the offline verdict, from the club's distance rule in the signed facts.
    expect(await page.getByTestId('fill-standoff').textContent()).toMatch(/\d+\.\d m/)
    // 12 bar is above the member's tier cap (T2, 10 bar): NO GO, and the refusal is kept too.
    await recordOffline(page, { memberId: member.memberId, tag: vessel.tag, stationName: station.name, pressureBar: '12', queued: 4 })
    expect(await page.getByTestId('fill-verdict-word').textContent()).toBe('NO GO')
    expect(await page.getByTestId('fill-kept').textContent()).toContain('Refusal kept on this device')
    expect(await page.getByTestId('fill-reasons').locator('[data-code="TIER_CAP_EXCEEDED"]').count()).toBe(1)
    expect(complaints).toEqual([])
    expect(await logged(vessel.vesselId)).toEqual({ allowed: 0, refused: 0 })
    const queue = await deviceQueue(page)
    expect(queue).toHaveLength(4)

    // The server is back: "Send now" sends the queue; each fill and the refusal is in the log once.
    server = await startAppServer({ root: ROOT, port: appPort, env })
    await page.getByTestId('fill-send-now').click()
    await expect.poll(() => page.getByTestId('fill-queue-count').getAttribute('data-count')).toBe('0')
    expect(await logged(vessel.vesselId)).toEqual({ allowed: 3, refused: 1 })
    expect(await deviceQueue(page)).toEqual([])
    expect(await page.getByTestId('fill-release').isVisible()).toBe(true)

    // The same queue sent again: every item a duplicate, nothing recorded twice.
    const again = await page.evaluate(async ([path, items]) => {
      const deviceId = await new Promise<string>((resolve) => {
        const req = indexedDB.open('hoopwise-fill')
        req.onsuccess = () => {
          const get = req.result.transaction('device').objectStore('device').get('id')
          get.onsuccess = () => resolve(get.result)
        }
      })
      const body = { deviceId, items: (items as Record<string, unknown>[]).map(({ eventId: _e, conflict: _c, ...item }) => item) }
      const res = await fetch(path, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })
      return { status: res.status, body: await res.json() as { results: { outcome: string }[] } }
    }, [`/api/events/${eventId}/fill-sync`, queue] as const)
    expect(again.status).toBe(200)
    expect(again.body.results.map(r => r.outcome)).toEqual(['duplicate', 'duplicate', 'duplicate', 'duplicate'])
    expect(await logged(vessel.vesselId)).toEqual({ allowed: 3, refused: 1 })
    await page.close()
  }, 180_000) // two server starts and a service-worker install: slow on a loaded machine
})
