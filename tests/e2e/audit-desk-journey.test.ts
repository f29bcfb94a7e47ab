import { randomUUID } from 'node:crypto'
import { describe, expect, inject, it } from 'vitest'
import QRCode from 'qrcode'
import { createPage } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, goTo, signedInPage, submitSignIn, watchPolicyViolations } from '../support/browser'
import { clubDay, makeFillStation, makeLaunchEvent, makeMember, makeProofTest, makeTier, makeTrainingRecord, makeVessel, type MadeMember } from '../support/factories'
import { api } from '../support/http'
import { sql } from '../support/db'
import { signIn } from '../support/global-setup'
import type { FillCheckDto } from '../../shared/types/fills'
import type { IncidentDto } from '../../shared/types/incidents'

await setupBrowser()

const PHONE = { viewport: { width: 360, height: 740 }, isMobile: true, hasTouch: true }

/** A page at a phone's size, signed in through the form as `m`. */
async function phonePage(m: MadeMember): Promise<Page> {
  const page = await createPage('/login', PHONE)
  await watchPolicyViolations(page)
  await submitSignIn(page, m.email, m.password)
  await page.waitForURL(url => url.pathname === '/')
  return page
}

const vesselState = async (id: string) => (await sql<{ state: string }>('SELECT state FROM vessels WHERE id = $1', [id]))[0]!.state

/**
 * Stands in for the phone's camera: getUserMedia answers a canvas stream showing the QR code of `text`
 * (drawn module by module, so no image has to be loaded), which the page's scanner then reads.
 */
async function cameraShowing(page: Page, text: string): Promise<void> {
  const qr = QRCode.create(text, { errorCorrectionLevel: 'M' })
  const code = { size: qr.modules.size, bits: Array.from(qr.modules.data) }
  await page.addInitScript((c: { size: number, bits: number[] }) => {
    const getUserMedia = async () => {
      const scale = 8
      const margin = 4
      const canvas = document.createElement('canvas')
      canvas.width = canvas.height = (c.size + 2 * margin) * scale
      const ctx = canvas.getContext('2d')!
      const draw = (tick: number) => {
        ctx.fillStyle = '#ffffff'
        ctx.fillRect(0, 0, canvas.width, canvas.height)
        ctx.fillStyle = '#000000'
        c.bits.forEach((on, i) => {
          if (on) ctx.fillRect((margin + (i % c.size)) * scale, (margin + Math.floor(i / c.size)) * scale, scale, scale)
        })
        // One changing corner pixel keeps frames coming.
        ctx.fillStyle = tick % 2 ? '#fefefe' : '#ffffff'
        ctx.fillRect(0, 0, 1, 1)
      }
      let tick = 0
      draw(tick)
      setInterval(() => draw(++tick), 100)
      return canvas.captureStream(10)
    }
    Object.defineProperty(navigator, 'mediaDevices', { configurable: true, value: { getUserMedia } })
  }, code)
}

describe('reporting an incident on a phone (/incidents/new)', () => {
  it('names another member chosen by typing their name and another member\'s vessel scanned from its label; sending quarantines it', async () => {
    const stamp = randomUUID().slice(0, 6)
    const reporter = await makeMember({ name: `Rhea Reporter ${stamp}` })
    const involved = await makeMember({ name: `Ivo Involved ${stamp}` })
    const { vesselId, tag } = await makeVessel({ ownerId: involved.memberId, state: 'in_service', name: 'Night Heron' })
    const page = await phonePage(reporter)
    try {
      await cameraShowing(page, `${inject('baseUrl')}/vessels/${tag}`)
      await goTo(page, '/incidents/new')
      await page.getByTestId('incident-kind').selectOption('burst')
      await page.getByTestId('incident-place').fill(`Pad ${stamp}`)

      // Nobody yet; a name typed finds the member (names only), and choosing adds them.
      expect(await page.getByTestId('incident-people-none').textContent()).toContain('Nobody named')
      await page.getByTestId('incident-people-search').fill(`involved ${stamp}`)
      await page.getByTestId(`incident-person-add-${involved.memberId}`).click()
      expect(await page.getByTestId('incident-people-chosen').textContent()).toContain(involved.name)
      await page.getByTestId('incident-involved-me').check()
      expect(await page.getByTestId('incident-people-chosen').locator('li').count()).toBe(2)
      await page.getByTestId(`incident-person-remove-${reporter.memberId}`).click()
      expect(await page.getByTestId('incident-people-chosen').locator('li').count()).toBe(1)

      // A wrong tag typed says so; the label scanned finds the vessel, which is not the reporter's.
      await page.getByTestId('incident-vessel-tag').fill('ZZZZ-9999')
      await page.getByTestId('incident-vessel-find').click()
      await expect.poll(() => page.getByTestId('incident-vessel-found').textContent()).toContain('no vessel tagged ZZZZ-9999')
      await page.getByTestId('incident-scan-vessel-start').click()
      await expect.poll(() => page.getByTestId('incident-vessel-found').textContent(), { timeout: 15_000 }).toContain('Night Heron')
      expect(await page.getByTestId('incident-vessel-tag').inputValue()).toBe(tag)
      expect(await page.getByTestId('incident-vessel-found').textContent()).toContain('In service')

      await page.getByTestId('incident-what').fill('The bottle split along its seam at the pad.')
      // Nothing sticks out sideways at a phone's width.
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360)
      await page.getByTestId('incident-send').click()
      await expect.poll(() => page.getByTestId('incident-confirm').textContent()).toContain(tag)
      expect(await vesselState(vesselId)).toBe('in_service')
      await page.getByTestId('incident-send').click()
      await page.waitForURL(url => /^\/incidents\/[0-9a-f-]{36}$/.test(url.pathname))
      await expect.poll(() => page.getByTestId('incident-vessel').textContent()).toContain('Quarantined')
      expect(await page.getByTestId('incident-facts').textContent()).toContain(involved.name)
      expect(await vesselState(vesselId)).toBe('quarantined')
    }
    finally {
      await page.close()
    }
  })
})

describe('the safety officer\'s journey from the audit desk', () => {
  it('opens the desk, follows an expiring tier to the member, opens the incident that quarantined a vessel, suspends the member\'s tier with a reason; the member\'s next fill check at that tier is refused', async () => {
    const stamp = randomUUID().slice(0, 6)
    const safety = await makeMember({ name: `Sol Safety ${stamp}`, roles: ['safety_officer'] })
    const instructor = await makeMember({ roles: ['instructor'] })
    await makeTier({ memberId: instructor.memberId, rank: 3, assessorId: safety.memberId, signedOn: clubDay(-40) })
    // The member holds T1 and a T2 that expires in 20 days, and may fill their own vessel to 10 bar (T2's cap) today.
    const member = await makeMember({ name: `Juno Tierheld ${stamp}`, birthDate: '1986-02-11', acceptWaiver: true })
    await makeTier({ memberId: member.memberId, rank: 1, assessorId: instructor.memberId, signedOn: clubDay(-300) })
    await makeTier({ memberId: member.memberId, rank: 2, assessorId: instructor.memberId, signedOn: clubDay(-700), expiresOn: clubDay(20) })
    for (const course of ['safety_briefing', 'pressure_safety', 'rig_operator']) {
      await makeTrainingRecord({ memberId: member.memberId, course, trainerId: instructor.memberId, trainedOn: clubDay(-30) })
    }
    const own = await makeVessel({ ownerId: member.memberId, state: 'in_service', volumeL: 2 })
    await makeProofTest({ vesselId: own.vesselId, witnessId: instructor.memberId, testedOn: clubDay(-10), pressureBar: 21 })
    const station = await makeFillStation({ name: `Launcher ${stamp}` })
    const { eventId } = await makeLaunchEvent({ createdBy: safety.memberId, stationIds: [station.stationId], registeredIds: [member.memberId], staffIds: [instructor.memberId], site: `Dune ${stamp}` })
    const memberCookie = await signIn(inject('baseUrl'), member.email, member.password)
    const check = () => api<FillCheckDto>('/api/fills/check', {
      method: 'POST', as: memberCookie,
      body: { memberId: member.memberId, vesselId: own.vesselId, pressure: 9, unit: 'bar', waterVolumeL: 0.6, stationId: station.stationId, eventId, supervised: false },
    })
    const before = await check()
    expect(before.status, JSON.stringify(before.body)).toBe(200)
    expect(before.body).toMatchObject({ allowed: true, reasons: [] })

    // Another member reports a burst of their own vessel that involved the member: the vessel is quarantined at once.
    const reporter = await makeMember()
    const burst = await makeVessel({ ownerId: reporter.memberId, state: 'in_service' })
    const reported = await api<IncidentDto>('/api/incidents', {
      method: 'POST', as: await signIn(inject('baseUrl'), reporter.email, reporter.password),
      body: { kind: 'burst', happenedAt: new Date(Date.now() - 600_000).toISOString(), place: `Pad ${stamp}`, eventId, vesselTag: burst.tag, peopleIds: [member.memberId], whatHappened: 'Burst at 9 bar while the member filled it.' },
    })
    expect(reported.status, JSON.stringify(reported.body)).toBe(201)

    const page = await signedInPage(safety.email, safety.password)
    try {
      // The desk opens at the tiers expiring; the member's T2 is there.
      await goTo(page, '/audit/desk')
      await page.getByTestId('desk-tiers-expiring').waitFor()
      await page.getByTestId('desk-search').fill(member.name)
      await page.getByTestId('desk-search').press('Enter')
      const row = page.getByTestId('desk-row').filter({ hasText: member.name })
      await expect.poll(() => row.count()).toBe(1)
      expect(await row.textContent()).toContain('T2')
      await row.getByRole('link', { name: member.name }).click()
      await page.waitForURL(url => url.pathname === `/members/${member.memberId}`)
      await expect.poll(() => page.getByTestId('tier-2').textContent()).toMatch(/T2/)

      // From the member to the open incident naming them, which quarantined the vessel.
      await page.getByTestId('member-incidents').click()
      await page.waitForURL(url => url.pathname === '/incidents' && url.searchParams.get('person') === member.memberId)
      await expect.poll(() => page.getByTestId('incident-row').count()).toBe(1)
      await page.getByTestId('incident-row').getByRole('link').click()
      await page.waitForURL(url => url.pathname === `/incidents/${reported.body.id}`)
      await expect.poll(() => page.getByTestId('incident-vessel').textContent()).toContain(`${burst.tag} — Quarantined`)

      // Suspend the member's T2 with a reason: the page asks first.
      await page.getByTestId('suspend-person').selectOption(member.memberId)
      await page.getByTestId('suspend-rank').selectOption('2')
      await page.getByTestId('suspend-reason').fill('Filled past the cap before the burst')
      await page.getByTestId('suspend-send').click()
      await page.getByTestId('suspend-confirm').waitFor()
      const [tierBefore] = await sql<{ suspended_at: Date | null }>('SELECT suspended_at FROM member_tiers WHERE membership_id = $1 AND rank = 2', [member.memberId])
      expect(tierBefore!.suspended_at).toBeNull()
      expect(await page.getByTestId('suspend-confirm').textContent()).toContain(`Suspend T2 of ${member.name}?`)
      await page.getByTestId('suspend-send').click()
      await expect.poll(() => page.getByTestId('incident-suspend').textContent()).toContain(`T2 of ${member.name} suspended.`)

      // The review is saved, and closing (asked first) leaves the vessel quarantined.
      await page.getByTestId('review-findings').fill('Filled past the tier\'s cap.')
      await page.getByTestId('review-save').click()
      await expect.poll(() => page.getByTestId('incident-review').textContent()).toContain('Review saved.')
      await page.getByTestId('close-outcome').fill('Tier suspended until retrained')
      await page.getByTestId('close-send').click()
      await page.getByTestId('close-confirm').waitFor()
      await page.getByTestId('close-send').click()
      await page.getByTestId('incident-closed').waitFor()
      expect(await page.getByTestId('incident-status').textContent()).toContain('Closed')
      expect(await page.getByTestId('incident-vessel').textContent()).toContain('Quarantined')
    }
    finally {
      await page.close()
    }

    const [tier] = await sql<{ suspension_reason: string }>('SELECT suspension_reason FROM member_tiers WHERE membership_id = $1 AND rank = 2', [member.memberId])
    expect(tier!.suspension_reason).toMatch(/^Filled past the cap before the burst \(incident of /)
    // The member's next fill check at T2's pressure: refused, T1's cap now limits.
    const after = await check()
    expect(after.status).toBe(200)
    expect(after.body.allowed).toBe(false)
    expect(after.body.reasons.map(r => r.code)).toEqual(['TIER_CAP_EXCEEDED'])
    expect(after.body.permittedMaxBar).toBe(6)
    expect(await vesselState(burst.vesselId)).toBe('quarantined')
  })
})
