import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import type { Page, Request } from 'playwright-core'
import { setupBrowser, goTo, submitSignIn, watchPolicyViolations } from '../support/browser'
import { clubDay, makeFill, makeFillPass, makeFillStation, makeLaunchEvent, makeMember, makeProofTest, makeTier, makeTrainingRecord, makeVessel, type MadeMember } from '../support/factories'
import { testEnv } from '../support/test-env'
import { deriveFillPassKey, fillPassToken } from '../../server/services/tiers/fill-pass-token'
import type { FillCheckDto } from '../../shared/types/fills'
import { fillReason } from '../../shared/utils/fill-reasons'

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

/** The data-testid of the element that has keyboard focus. */
const focused = (page: Page) => page.evaluate(() => document.activeElement?.getAttribute('data-testid') ?? document.activeElement?.id ?? null)

/** Tabs until `testId` has focus (at most `max` presses); fails otherwise. */
async function tabTo(page: Page, testId: string, max = 60): Promise<void> {
  for (let i = 0; i < max && await focused(page) !== testId; i++) await page.keyboard.press('Tab')
  expect(await focused(page)).toBe(testId)
}

/** A member who may fill their own in-service vessel to 10 bar (T2) on a station at today's event. */
async function fillingMember() {
  const instructor = await makeMember({ roles: ['instructor'] })
  const member = await makeMember({ birthDate: '1985-06-01', acceptWaiver: true })
  await makeTier({ memberId: member.memberId, rank: 1, assessorId: instructor.memberId, signedOn: clubDay(-200) })
  await makeTier({ memberId: member.memberId, rank: 2, assessorId: instructor.memberId, signedOn: clubDay(-20) })
  for (const course of ['safety_briefing', 'pressure_safety', 'rig_operator']) {
    await makeTrainingRecord({ memberId: member.memberId, course, trainerId: instructor.memberId, trainedOn: clubDay(-30) })
  }
  const vessel = await makeVessel({ ownerId: member.memberId, state: 'in_service', name: 'Sun Kestrel', volumeL: 2 })
  // Proof at 21 bar with the margin 1.5: a rated fill of 14 bar, above the tier's 10 bar.
  await makeProofTest({ vesselId: vessel.vesselId, witnessId: instructor.memberId, testedOn: clubDay(-10), pressureBar: 21 })
  const station = await makeFillStation({ name: `Launcher ${vessel.tag}` })
  const { eventId } = await makeLaunchEvent({ createdBy: instructor.memberId, stationIds: [station.stationId], registeredIds: [member.memberId], staffIds: [instructor.memberId], site: 'Salt flat' })
  return { instructor, member, vessel, station, eventId }
}

/** Types the facts of a fill on the page: the tag, the station, the pressure (bar) and the water. */
async function enterFill(page: Page, o: { tag: string, stationName: string, pressureBar: string, waterL: string }) {
  await page.getByTestId('fill-tag').fill(o.tag)
  await page.getByTestId('fill-tag-find').click()
  await expect.poll(() => page.getByTestId('fill-vessel').textContent()).toContain(o.tag.toUpperCase())
  await page.getByTestId(`fill-station-${o.stationName}`).check()
  await page.getByTestId('fill-unit-bar').check()
  await page.getByTestId('fill-pressure').fill(o.pressureBar)
  await page.getByTestId('fill-water').fill(o.waterL)
}

describe('the launch-side fill page (/events/<id>/fill)', () => {
  it('sends the gate what was typed and shows NO GO with every reason, the rounded-down maximum, its limit and the standoff; then GO (at a phone\'s size)', async () => {
    // The page against the gate's contract (shared/types/fills.ts): the answers come from a stand-in here;
    // the journey below runs the real gate.
    const { member, vessel, station, eventId } = await fillingMember()
    const page = await phonePage(member)
    const sent: unknown[] = []
    await page.route('**/api/fills/check', async (route, request: Request) => {
      const body = request.postDataJSON() as { pressure: number }
      sent.push(body)
      const no = body.pressure > 10
      const answer: FillCheckDto = {
        allowed: !no, requested: { pressureBar: body.pressure }, permittedMaxBar: 9.99, limitingFactor: 'TIER',
        reasons: no ? [fillReason('TIER_CAP_EXCEEDED'), fillReason('EVENT_CAP_EXCEEDED')] : [],
        airCharge: { storedEnergyJ: 2725.4, tntEquivalentKg: 0.00058, minimumDistanceM: 6.25 },
      }
      await route.fulfill({ json: answer })
    })
    await page.route('**/api/fills', route => route.fulfill({ status: 422, json: { statusCode: 422, message: 'Refused', data: { reasons: [fillReason('EVENT_NOT_TODAY')] } } }))
    try {
      await goTo(page, `/events/${eventId}/fill`)
      expect(await page.getByTestId('fill-cautions').textContent()).toMatch(/remotely.*Eye protection.*minimum from an industrial code/s)
      expect(await page.getByTestId('fill-member-self').textContent()).toContain(member.name)
      await enterFill(page, { tag: vessel.tag.toLowerCase(), stationName: station.name, pressureBar: '12', waterL: '0.6' })
      await page.getByTestId('fill-check').click()

      await expect.poll(() => page.getByTestId('fill-verdict-word').textContent()).toBe('NO GO')
      expect(sent[0]).toEqual({ memberId: member.memberId, vesselId: vessel.vesselId, pressure: 12, unit: 'bar', waterVolumeL: 0.6, stationId: station.stationId, eventId, supervised: false })
      const reasons = await page.getByTestId('fill-reasons').locator('li').allTextContents()
      expect(reasons.map(r => r.trim())).toEqual([fillReason('TIER_CAP_EXCEEDED').message, fillReason('EVENT_CAP_EXCEEDED').message])
      // 9.99 bar shows as 9.9 bar, never 10.0.
      expect(await page.getByTestId('fill-permitted-max').textContent()).toContain('9.9 bar')
      expect(await page.getByTestId('fill-limiting-factor').textContent()).toContain('Member\'s tier')
      expect(await page.getByTestId('fill-standoff').textContent()).toContain('6.3 m')
      expect(await page.getByTestId('fill-stored-energy').textContent()).toContain('2,725 J')
      // The cautions stay on screen with the answer, and the verdict is large.
      await page.getByTestId('fill-cautions').isVisible()
      const size = await page.getByTestId('fill-verdict-word').evaluate(el => Number.parseFloat(getComputedStyle(el).fontSize))
      expect(size).toBeGreaterThanOrEqual(48)
      // Nothing sticks out sideways at a phone's width.
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360)

      await page.getByTestId('fill-pressure').fill('9')
      await page.getByTestId('fill-check').click()
      await expect.poll(() => page.getByTestId('fill-verdict-word').textContent()).toBe('GO')
      expect(await page.getByTestId('fill-reasons').count()).toBe(0)

      // Recording that the gate refuses shows the reasons it answered with.
      await page.getByTestId('fill-record').click()
      await expect.poll(() => page.getByTestId('fill-verdict-word').textContent()).toBe('NO GO')
      expect(await page.getByTestId('fill-reasons').textContent()).toContain(fillReason('EVENT_NOT_TODAY').message)
    }
    finally {
      await page.close()
    }
  })

  it('can be worked from the keyboard alone, and says what is missing before asking the gate', async () => {
    const { member, vessel, station, eventId } = await fillingMember()
    const page = await phonePage(member)
    let asked = 0
    await page.route('**/api/fills/check', async (route) => {
      asked++
      await route.fulfill({ json: { allowed: true, requested: { pressureBar: 5 }, permittedMaxBar: 10, limitingFactor: 'TIER', reasons: [], airCharge: { storedEnergyJ: 1000, tntEquivalentKg: 0.0002, minimumDistanceM: 5 } } })
    })
    try {
      await goTo(page, `/events/${eventId}/fill`)
      await page.getByTestId('fill-check').click()
      await expect.poll(() => page.getByTestId('fill-problem').textContent()).toMatch(/vessel/i)
      expect(asked).toBe(0)

      await tabTo(page, 'fill-tag')
      await page.keyboard.type(vessel.tag)
      await page.keyboard.press('Enter')
      await expect.poll(() => page.getByTestId('fill-vessel').textContent()).toContain('Sun Kestrel')
      await tabTo(page, `fill-station-${station.name}`)
      await page.keyboard.press('Space')
      await tabTo(page, 'fill-pressure')
      await page.keyboard.type('5')
      await tabTo(page, 'fill-water')
      await page.keyboard.type('0.5')
      await tabTo(page, 'fill-check')
      await page.keyboard.press('Enter')
      await expect.poll(() => page.getByTestId('fill-verdict-word').textContent()).toBe('GO')
      expect(asked).toBe(1)
      // Focus moves to the answer, so a screen reader reads it at once.
      expect(await focused(page)).toBe('fill-verdict')
    }
    finally {
      await page.close()
    }
  })

  it('a staff member scanning nothing still chooses the member from those registered', async () => {
    const { instructor, member, eventId } = await fillingMember()
    const page = await phonePage(instructor)
    try {
      await goTo(page, `/events/${eventId}/fill`)
      const options = await page.getByTestId('fill-member').locator('option').allTextContents()
      expect(options).toContain(member.name)
      await page.getByTestId('scan-pass-start').waitFor()
      await page.getByTestId('scan-vessel-start').waitFor()
    }
    finally {
      await page.close()
    }
  })

  // The real gate (its routes came from branch `gate`): 12 bar is over the T2 cap, 9 bar is allowed.
  it('the whole journey: an instructor signs a member off for T2; the member\'s fill at 12 bar is refused for the tier\'s cap, at 9 bar recorded; the verify page of the member\'s pass shows T2', async () => {
    // The member meets every T2 prerequisite (T1 held 4 months, the test-rig course, 10 logged fills of
    // which 5 supervised) but holds only T1; the instructor holds T3, so may sign off T2.
    const safety = await makeMember({ roles: ['safety_officer'] })
    const instructor = await makeMember({ roles: ['instructor'] })
    await makeTier({ memberId: instructor.memberId, rank: 3, assessorId: safety.memberId, signedOn: clubDay(-40) })
    const member = await makeMember({ name: 'Tamsin Twotier', birthDate: '1988-03-14', acceptWaiver: true })
    await makeTier({ memberId: member.memberId, rank: 1, assessorId: instructor.memberId, signedOn: clubDay(-130) })
    for (const course of ['safety_briefing', 'pressure_safety', 'rig_operator']) {
      await makeTrainingRecord({ memberId: member.memberId, course, trainerId: instructor.memberId, trainedOn: clubDay(-30) })
    }
    const vessel = await makeVessel({ ownerId: member.memberId, state: 'in_service', name: 'Tern', volumeL: 2 })
    const station = await makeFillStation({ name: `Launcher ${vessel.tag}` })
    const past = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(-60), stationIds: [station.stationId], staffIds: [instructor.memberId] })
    for (let i = 0; i < 10; i++) {
      await makeFill({ eventId: past.eventId, stationId: station.stationId, memberId: member.memberId, vesselId: vessel.vesselId, supervisorId: i < 5 ? instructor.memberId : undefined, pressureBar: 5 })
    }
    // Proof at 21 bar with the margin 1.5 after those fills: a rated fill of 14 bar, above T2's 10 bar.
    await makeProofTest({ vesselId: vessel.vesselId, witnessId: instructor.memberId, testedOn: clubDay(-10), pressureBar: 21 })
    const { eventId } = await makeLaunchEvent({ createdBy: safety.memberId, stationIds: [station.stationId], registeredIds: [member.memberId], staffIds: [instructor.memberId], site: 'Salt flat' })

    const assessor = await createPage('/login')
    try {
      await submitSignIn(assessor, instructor.email, instructor.password)
      await assessor.waitForURL(url => url.pathname === '/')
      await goTo(assessor, `/members/${member.memberId}`)
      await assessor.getByTestId('tier-grant-rank').selectOption('2')
      await assessor.getByTestId('tier-grant-submit').click()
      await assessor.getByTestId('tier-2').waitFor()
      expect(await assessor.getByTestId('tier-2').textContent()).toMatch(/T2/)
    }
    finally {
      await assessor.close()
    }

    const page = await phonePage(member)
    try {
      await goTo(page, `/events/${eventId}/fill`)
      await enterFill(page, { tag: vessel.tag, stationName: station.name, pressureBar: '12', waterL: '0.6' })
      await page.getByTestId('fill-check').click()
      await expect.poll(() => page.getByTestId('fill-verdict-word').textContent()).toBe('NO GO')
      expect(await page.getByTestId('fill-reasons').locator('li[data-code]').evaluateAll(els => els.map(e => e.getAttribute('data-code')))).toEqual(['TIER_CAP_EXCEEDED'])
      expect(await page.getByTestId('fill-permitted-max').textContent()).toContain('10.0 bar')
      await page.getByTestId('fill-pressure').fill('9')
      await page.getByTestId('fill-record').click()
      await expect.poll(() => page.getByTestId('fill-verdict-word').textContent()).toBe('GO')
      await page.getByTestId('fill-recorded').waitFor()

      await goTo(page, '/fill-pass')
      await page.getByTestId('fill-pass-qr').waitFor()
      const path = new URL((await page.getByTestId('fill-pass-url').textContent() ?? '').trim()).pathname
      const stranger = await createPage(undefined, PHONE)
      try {
        await goTo(stranger, path)
        expect(await stranger.getByTestId('verify-name').textContent()).toContain('Tamsin Twotier')
        expect(await stranger.getByTestId('verify-tiers').textContent()).toMatch(/T2\s+Reinforced/)
      }
      finally {
        await stranger.close()
      }
    }
    finally {
      await page.close()
    }
  })
})

describe('the verify page (/verify/<token>)', () => {
  const key = deriveFillPassKey(testEnv.sessionPassword)

  it('the member opens their pass; its address shows their name and valid tier without signing in', async () => {
    const instructor = await makeMember({ roles: ['instructor'] })
    const member = await makeMember({ name: 'Pia Passholder' })
    await makeTier({ memberId: member.memberId, rank: 2, assessorId: instructor.memberId, signedOn: clubDay(-5) })
    const page = await phonePage(member)
    try {
      await goTo(page, '/fill-pass')
      await page.getByTestId('fill-pass-qr').waitFor()
      const url = await page.getByTestId('fill-pass-url').textContent() ?? ''
      expect(url).toMatch(/\/verify\/[A-Za-z0-9_-]{43}$/)
      const path = new URL(url.trim()).pathname

      const stranger = await createPage(undefined, PHONE)
      try {
        await goTo(stranger, path)
        expect(await stranger.getByTestId('verify-name').textContent()).toContain('Pia Passholder')
        expect(await stranger.getByTestId('verify-active').textContent()).toContain('Membership active')
        expect(await stranger.getByTestId('verify-tiers').textContent()).toMatch(/T2\s+Reinforced/)
      }
      finally {
        await stranger.close()
      }

      // Issuing a new pass asks first, then the old address shows a refusal.
      await page.getByTestId('fill-pass-renew').click()
      await page.getByTestId('fill-pass-renew-confirm').click()
      await expect.poll(() => page.getByTestId('fill-pass-url').textContent()).not.toBe(url)
      await goTo(page, path)
      expect(await page.getByTestId('verify-refusal').textContent()).toMatch(/replaced/)
    }
    finally {
      await page.close()
    }
  })

  it('refuses a forged code and an expired pass in plain words', async () => {
    const m = await makeMember()
    const { passId } = await makeFillPass({ memberId: m.memberId, expiresAt: { interval: '1 day', before: true }, issuedAt: { interval: '13 months', before: true } })
    const page = await createPage(undefined, PHONE)
    try {
      await goTo(page, `/verify/${fillPassToken(key, passId)}`)
      expect(await page.getByTestId('verify-refusal').textContent()).toMatch(/expired/)
      await goTo(page, `/verify/${fillPassToken(deriveFillPassKey('not-the-server-secret-at-least-32-chars'), passId)}`)
      expect(await page.getByTestId('verify-refusal').textContent()).toMatch(/not a fill pass/)
      expect(await page.getByTestId('verify-refused').textContent()).not.toContain(m.name)
    }
    finally {
      await page.close()
    }
  })
})
