import { describe, expect, inject, it } from 'vitest'
import QRCode from 'qrcode'
import sharp from 'sharp'
import type { Page } from 'playwright-core'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { clubDay, makeClub, makeMember, makeTier } from '../support/factories'
import { sql } from '../support/db'
import { api } from '../support/http'
import { signIn } from '../support/global-setup'
import { DEMO } from '../support/test-env'
import { formatCalendarDate } from '../../shared/utils/dates'

await setupBrowser()

/** A prefix of five random capitals: a club of the test's own, so its tags are the test's alone. */
function randomPrefix(): string {
  return Array.from({ length: 5 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
}

/** The data-testid of the element that has keyboard focus. */
const focused = (page: Page) => page.evaluate(() => document.activeElement?.getAttribute('data-testid') ?? document.activeElement?.tagName ?? null)

/** The number in a figure's text: "2,725 J" → 2725. */
async function figure(page: Page, testId: string): Promise<number> {
  const text = await page.getByTestId(testId).textContent() ?? ''
  return Number(text.replace(/,/g, '').match(/-?\d+(\.\d+)?/)?.[0])
}

describe('the vessel registry in the browser', () => {
  it('a member registers a vessel through the form, lands on its page by tag, and opens its printable label', async () => {
    // A club of its own, on a public address that is not the one the browser uses: the label must carry the club's.
    const prefix = randomPrefix()
    const publicUrl = `https://launch-${prefix.toLowerCase()}.example.org`
    const club = await makeClub({ name: `Label Club ${prefix}`, tagPrefix: prefix, publicUrl: `${publicUrl}/` })
    const member = await makeMember({ clubId: club.id })
    const page = await signedInPage(member.email, member.password)
    try {
      // Keyboard: from the navigation to the list, then Tab to "Register a vessel" and Enter.
      await page.getByTestId('nav-vessels').click()
      await page.waitForURL(url => url.pathname === '/vessels')
      await page.getByTestId('vessels-empty').waitFor()
      await page.getByTestId('nav-vessels').focus()
      for (let i = 0; i < 15 && await focused(page) !== 'vessel-register'; i++) await page.keyboard.press('Tab')
      expect(await focused(page)).toBe('vessel-register')
      await page.keyboard.press('Enter')
      await page.waitForURL(url => url.pathname === '/vessels/new')
      await page.waitForFunction(() => (window as unknown as { useNuxtApp?: () => { isHydrating: boolean } }).useNuxtApp?.().isHydrating === false)

      const form = page.getByTestId('vessel-form')
      await form.getByTestId('field-name').fill('Blue Heron')
      await form.getByTestId('field-construction').selectOption('overwrapped_liner')
      await form.getByTestId('field-volumeL').fill('3')
      await form.getByTestId('field-diameterMm').fill('104.5')
      // A laid-up construction shows its laminate with the resin and cure cautions.
      await page.getByTestId('vessel-form-laminate').waitFor()
      expect(await page.getByTestId('vessel-form-cautions').textContent()).toMatch(/sensitise skin.*cured/s)
      await form.getByTestId('vessel-submit').click()
      // The laminate is given whole: the schema's own message, and focus on the first field it names.
      await expect.poll(() => form.getByTestId('error-fibreClass').textContent()).toContain('Describe the whole laminate')
      await expect.poll(() => focused(page)).toBe('field-fibreClass')
      await form.getByTestId('field-fibreClass').selectOption('e_glass')
      await form.getByTestId('field-weave').selectOption('woven_0_90')
      await form.getByTestId('field-arealWeightGPerM2').fill('300')
      await form.getByTestId('field-plies').fill('3')
      await form.getByTestId('field-resin').fill('Laminating epoxy')
      const layup = clubDay(0)
      await form.getByTestId('field-lastLayupOn').fill(layup)
      await form.getByTestId('vessel-submit').click()

      const tag = `${prefix}-0001`
      await page.waitForURL(url => url.pathname === `/vessels/${tag}`)
      await expect.poll(() => page.getByTestId('vessel-tag').textContent()).toBe(tag)
      expect(await page.getByTestId('vessel-state-awaiting_proof').textContent()).toBe('Awaiting proof')
      expect(await page.getByTestId('vessel-rated-fill').textContent()).toContain('only a witnessed proof test sets a rated fill')
      // Laid up today: the cure clock says no proof before the default 7 days have passed.
      const [y, m, d] = layup.split('-').map(Number) as [number, number, number]
      const cured = new Date(Date.UTC(y, m - 1, d + 7)).toISOString().slice(0, 10)
      expect(await page.getByTestId('vessel-cure-clock').textContent()).toContain(`Curing: no proof test before ${formatCalendarDate(cured)}`)
      const [row] = await sql<{ name: string, owner_membership_id: string, state: string }>('SELECT name, owner_membership_id, state FROM vessels WHERE club_id = $1 AND tag = $2', [club.id, tag])
      expect(row).toEqual({ name: 'Blue Heron', owner_membership_id: member.memberId, state: 'awaiting_proof' })

      // The standoff box: 3 L vessel, a third water by default; 10 bar gives 2 L of air at 2725 J (ASME PCC-2 App. II).
      expect(await page.getByTestId('standoff-water').inputValue()).toBe('1')
      await page.getByTestId('standoff-pressure').fill('10')
      await expect.poll(() => figure(page, 'calc-energy')).toBeCloseTo(2725, -1)
      expect(await figure(page, 'calc-distance')).toBe(30) // ASME PCC-2 App. III (a): the 30 m floor
      expect(await page.getByTestId('standoff-rule').textContent()).toContain('20 × TNT⅓')
      expect(await page.getByTestId('calc-cautions').textContent()).toMatch(/Nobody stands over a pressurised vessel/)

      // The printable label: the QR code is the vessel's page on the club's public address.
      await page.getByTestId('vessel-label-link').click()
      await page.waitForURL(url => url.pathname === `/vessels/${tag}/label`)
      const pageUrl = `${publicUrl}/vessels/${tag}`
      await expect.poll(() => page.getByTestId('label-url').textContent()).toContain(pageUrl)
      const src = await page.getByTestId('label-qr').getAttribute('src') ?? ''
      const svg = decodeURIComponent(src.replace(/^data:image\/svg\+xml;charset=utf-8,/, ''))
      expect(svg).toBe(await QRCode.toString(pageUrl, { type: 'svg', errorCorrectionLevel: 'M', margin: 0 }))
      expect(await page.getByTestId('label-qr').evaluate(img => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
      expect(await page.getByTestId('vessel-label').textContent()).toMatch(new RegExp(`${tag}.*Blue Heron.*${member.name}.*Overwrapped liner.*No rated fill`, 's'))

      // One label for the roll, or an A4 sheet of them; printing shows only the labels.
      expect(await page.getByTestId('vessel-label').count()).toBe(1)
      await page.getByTestId('label-layout-a4').check()
      await page.waitForURL(url => url.searchParams.get('sheet') === 'a4')
      await expect.poll(() => page.getByTestId('vessel-label').count()).toBe(24)
      await page.emulateMedia({ media: 'print' })
      expect(await page.getByTestId('main-nav').isVisible()).toBe(false)
      expect(await page.getByTestId('label-print').isVisible()).toBe(false)
      expect(await page.getByTestId('label-sheet-a4').isVisible()).toBe(true)
      await page.emulateMedia({ media: 'screen' })
    }
    finally {
      await page.close()
    }
  })

  it('the owner asks for a proof test, an instructor who is not the owner records a pass with a gauge photo, and the owner sees the rated fill', async () => {
    const prefix = randomPrefix()
    const club = await makeClub({ name: `Proof Club ${prefix}`, tagPrefix: prefix })
    const owner = await makeMember({ clubId: club.id, unitPreference: 'bar' })
    const instructor = await makeMember({ clubId: club.id, roles: ['instructor'] })
    await makeTier({ memberId: instructor.memberId, rank: 3 }) // a witness holds a valid T3 or higher
    const cookie = await signIn(inject('baseUrl'), owner.email, owner.password)
    const made = (await api<{ tag: string }>('/api/vessels', { method: 'POST', as: cookie, body: { name: 'Ringed Plover', construction: 'single_bottle', volumeL: 2, diameterMm: 102 } })).body

    const gauge = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 230, g: 230, b: 220 } } }).jpeg().toBuffer()
    const ownerPage = await signedInPage(owner.email, owner.password)
    try {
      await goTo(ownerPage, `/vessels/${made.tag}`)
      // The owner may not witness their own vessel: no proof form, only the request.
      expect(await ownerPage.getByTestId('proof-form').count()).toBe(0)
      await ownerPage.getByTestId('proof-ask').click()
      await expect.poll(() => ownerPage.getByTestId('proof-ask').textContent()).toContain('Proof test asked for')
    }
    finally {
      await ownerPage.close()
    }

    const witness = await signedInPage(instructor.email, instructor.password)
    try {
      await goTo(witness, `/vessels/${made.tag}`)
      const form = witness.getByTestId('proof-form')
      await form.waitFor()
      expect(await form.textContent()).toMatch(/Nobody stands over a pressurised vessel|pressure/i)
      await form.getByTestId('proof-pressure').fill('217.5')
      await form.getByTestId('proof-unit').selectOption('psi')
      await form.getByTestId('proof-hold').fill('120')
      await form.getByTestId('proof-result').selectOption('pass')
      await form.getByTestId('proof-gauge-photo').setInputFiles({ name: 'gauge.jpg', mimeType: 'image/jpeg', buffer: gauge })
      await form.getByTestId('proof-save').click()
      await expect.poll(() => witness.getByTestId('vessel-state-in_service').count()).toBe(1)
      // 217.5 psi = 14.996 bar (NIST SP 811 B.8: 1 psi = 6 894.757 Pa), kept as 14.99 (rounded down);
      // rated fill = proof ÷ the club's margin 1.5 (the project's default), rounded down: 9.99 bar.
      await expect.poll(() => witness.getByTestId('vessel-rated-fill').textContent()).toContain('9.99 bar')
      expect(await witness.getByTestId('proof-history').textContent()).toContain(instructor.name)
    }
    finally {
      await witness.close()
    }
    const [row] = await sql<{ pressure_bar: string, rated_fill_bar: string, witness: string, gauge: string | null }>(
      `SELECT t.pressure_bar::text, t.rated_fill_bar::text, t.witness_membership_id AS witness, t.gauge_photo_id AS gauge
        FROM proof_tests t JOIN vessels v ON v.id = t.vessel_id WHERE v.tag = $1`, [made.tag])
    expect(row).toMatchObject({ witness: instructor.memberId })
    expect(Number(row!.pressure_bar)).toBe(14.99)
    expect(Number(row!.rated_fill_bar)).toBe(9.99)
    expect(row!.gauge).not.toBeNull()

    const again = await signedInPage(owner.email, owner.password)
    try {
      await goTo(again, `/vessels/${made.tag}`)
      await expect.poll(() => again.getByTestId('vessel-rated-fill').textContent()).toContain('9.99 bar')
      expect(await again.getByTestId('vessel-valid-through').textContent()).toMatch(/\d{4}/)
      // The gauge photo is in the vessel's gallery for its owner, who adds a build photo beside it.
      await expect.poll(() => again.locator('[data-testid="vessel-photos"] img').count()).toBe(1)
      const upload = again.getByTestId('photo-upload-build')
      await upload.getByTestId('photo-file').setInputFiles({ name: 'layup.jpg', mimeType: 'image/jpeg', buffer: gauge })
      await upload.getByTestId('photo-caption').fill('Second ply, wet out')
      await upload.getByTestId('photo-upload').click()
      await expect.poll(() => again.locator('[data-testid="vessel-photos"] img').count()).toBe(2)
      expect(await again.getByAltText('Second ply, wet out').count()).toBe(1)
      await again.getByTestId('vessel-label-link').click()
      await again.waitForURL(url => url.pathname === `/vessels/${made.tag}/label`)
      await expect.poll(() => again.getByTestId('vessel-label').textContent()).toContain('9.99 bar')
    }
    finally {
      await again.close()
    }
  })

  it('an officer filters the club\'s table by state, searches by tag, and a member cannot open another\'s vessel', async () => {
    const owner = await makeMember()
    const cookie = await signIn(inject('baseUrl'), owner.email, owner.password)
    const made = (await api<{ tag: string }>('/api/vessels', { method: 'POST', as: cookie, body: { name: 'Grey Plover', construction: 'single_bottle', volumeL: 2, diameterMm: 102 } })).body

    const page = await signedInPage(DEMO.safety, DEMO.password)
    try {
      await goTo(page, '/vessels')
      await page.getByTestId('vessel-table').waitFor()
      await page.getByTestId('filter-state').selectOption('awaiting_proof')
      await page.waitForURL(url => url.searchParams.get('state') === 'awaiting_proof')
      await expect.poll(async () => (await page.getByTestId('vessel-row').allTextContents()).every(t => t.includes('Awaiting proof'))).toBe(true)
      await page.getByTestId('vessel-search').fill(made.tag.toLowerCase())
      await page.waitForURL(url => url.searchParams.get('q') === made.tag.toLowerCase())
      await expect.poll(() => page.getByTestId('vessel-row').count()).toBe(1)
      expect(await page.getByTestId('vessel-row').textContent()).toContain(owner.name)
      await expect.poll(() => page.getByTestId('vessels-total').textContent()).toContain('1 vessel matches')
      // The proof-lapsing filter lives in the URL like the others.
      await page.getByTestId('filter-lapsing').check()
      await page.waitForURL(url => url.searchParams.get('lapsing') === '1')
      await page.getByTestId('filter-lapsing').uncheck()
      await page.waitForURL(url => !url.searchParams.has('lapsing'))
      // Keyboard: Enter on the tag's link opens the vessel's page.
      await page.getByTestId(`vessel-link-${made.tag}`).focus()
      await page.keyboard.press('Enter')
      await page.waitForURL(url => url.pathname === `/vessels/${made.tag}`)
      await expect.poll(() => page.getByTestId('vessel-tag').textContent()).toBe(made.tag)
    }
    finally {
      await page.close()
    }

    // The demo member is not its owner and has no vessels.read_all: 404 in words.
    const other = await signedInPage(DEMO.member, DEMO.password)
    try {
      await goTo(other, `/vessels/${made.tag}`)
      expect(await other.getByTestId('vessel-error').textContent()).toContain(`There is no vessel ${made.tag}`)
    }
    finally {
      await other.close()
    }
  })
})
