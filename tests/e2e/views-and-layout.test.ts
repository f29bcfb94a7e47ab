import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, goTo, signedInPage, submitSignIn } from '../support/browser'
import { makeMember, noticesOf, setNotice, CLUB_TIME_ZONE } from '../support/factories'
import { api } from '../support/http'
import { sql } from '../support/db'
import { DEMO } from '../support/test-env'

await setupBrowser()

/** Signs in through the form on a page opened with browser options (viewport, the viewer's time zone). */
async function signedInWith(email: string, options: Parameters<typeof createPage>[1]): Promise<Page> {
  const page = await createPage('/login', options)
  await submitSignIn(page, email, DEMO.password)
  await page.waitForURL(url => url.pathname === '/')
  return page
}

/** "Page 2 of 2 · 26–42 of 42 notices" → its numbers. */
async function pagerNumbers(page: Page, testId: string) {
  const text = (await page.getByTestId(`${testId}-status`).textContent()) ?? ''
  const m = text.replace(/\s+/g, ' ').match(/Page (\d+) of (\d+) · (\d+)–(\d+) of (\d+)/)
  expect(m, text).not.toBeNull()
  const [page_, pages, first, last, total] = m!.slice(1).map(Number) as [number, number, number, number, number]
  return { page: page_, pages, first, last, total }
}

describe('views kept in the address', () => {
  it('the outbox opens on the dashboard\'s /outbox?status=failed and keeps its filters in the URL', async () => {
    const member = await makeMember({ paidDays: 7 })
    expect((await api('/api/outbox/run', { method: 'POST', as: 'admin' })).status).toBe(200)
    const [reminder] = await noticesOf(member.memberId)
    await setNotice(reminder!, { status: 'failed', lastError: '550 Mailbox unavailable (views test)' })

    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(page, '/outbox?status=failed')
      await page.locator('[data-testid="notice-row"]', { hasText: member.name }).waitFor()
      expect(await page.getByTestId('outbox-filter-status').inputValue()).toBe('failed')
      const chips = await page.getByTestId('notice-row').locator('[data-testid^="notice-status-"]').allTextContents()
      expect(chips.length).toBeGreaterThan(0)
      expect(chips.every(c => c.includes('Failed'))).toBe(true)

      await page.getByTestId('outbox-filter-kind').selectOption('dues_reminder')
      await page.waitForURL(url => url.searchParams.get('kind') === 'dues_reminder' && url.searchParams.get('status') === 'failed')
      await page.getByTestId('outbox-pager-size').selectOption('10')
      await page.waitForURL(url => url.searchParams.get('pageSize') === '10' && !url.searchParams.has('page'))

      // A page past the end moves to the last page, and the pager never counts past the total.
      await goTo(page, '/outbox?status=failed&page=99')
      await page.waitForURL(url => url.searchParams.get('page') !== '99')
      await page.locator('[data-testid="notice-row"]').first().waitFor()
      const n = await pagerNumbers(page, 'outbox-pager')
      expect(n.page).toBe(n.pages)
      expect(n.first).toBeLessThanOrEqual(n.last)
      expect(n.last).toBe(n.total)
    }
    finally {
      await page.close()
    }
  })

  it('the directory moves a page past the end back to the last page and announces the count politely', async () => {
    const tag = randomUUID().slice(0, 8)
    await makeMember({ name: `Corrie Shingle ${tag}` })
    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(page, `/members?q=shingle ${tag}&page=7`)
      await page.waitForURL(url => !url.searchParams.has('page') && url.searchParams.get('q') === `shingle ${tag}`)
      await expect.poll(() => page.getByTestId('member-row').count()).toBe(1)
      const count = page.getByTestId('members-total')
      expect(await count.getAttribute('aria-live')).toBe('polite')
      await expect.poll(() => count.textContent()).toBe('1 member matches')
      expect(await pagerNumbers(page, 'pager')).toEqual({ page: 1, pages: 1, first: 1, last: 1, total: 1 })

      await makeMember({ name: `Corrie Shingle ${tag} Two` })
      await goTo(page, `/members?q=shingle ${tag}`)
      await expect.poll(() => count.textContent()).toBe('2 members match')
    }
    finally {
      await page.close()
    }
  })

  it('the audit trail moves a page past the end back to the last page', async () => {
    // At least one event of our own, whichever order the files run in.
    const pending = await makeMember({ paidDays: null, approved: false })
    expect((await api(`/api/members/${pending.memberId}/approve`, { method: 'POST', as: 'admin', body: { reason: 'Browser test of the audit pager' } })).status).toBe(200)
    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(page, '/audit?page=99999')
      await page.waitForURL(url => url.searchParams.get('page') !== '99999')
      await page.getByTestId('audit-event').first().waitFor()
      const n = await pagerNumbers(page, 'pager')
      expect(n.page).toBe(n.pages)
      expect(n.last).toBe(n.total)
      expect(new URL(page.url()).searchParams.get('page') ?? '1').toBe(String(n.pages))
    }
    finally {
      await page.close()
    }
  })

  it('the audit trail says which contact fields changed, in words, and names the actor as they are now', async () => {
    const member = await makeMember()
    const edit = await api(`/api/members/${member.memberId}`, { method: 'PATCH', as: 'admin', body: { phone: '+44 1632 960888', emergencyContactName: 'Odile Ferncastle' } })
    expect(edit.status).toBe(200)
    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(page, `/audit?subjectId=${member.memberId}`)
      const event = page.getByTestId('audit-event').first()
      await expect.poll(() => event.getByTestId('audit-changed-fields').textContent()).toContain('Phone, Emergency contact changed')
      expect(await event.getByTestId('audit-actor').textContent()).toContain('Anselm Brackwater')
      expect(await event.textContent()).not.toContain('Odile Ferncastle')
    }
    finally {
      await page.close()
    }
  })
})

describe('the audit trail in words', () => {
  it('names actions and changed fields in words, times in the club\'s format, and filters by an action\'s label', async () => {
    const member = await makeMember()
    expect((await api(`/api/members/${member.memberId}/suspend`, { method: 'POST', as: 'admin', body: { reason: 'Browser test of audit words' } })).status).toBe(200)
    const [row] = await sql<{ suspended_at: Date }>('SELECT suspended_at FROM memberships WHERE id = $1', [member.memberId])
    const page = await signedInWith(DEMO.admin, { timezoneId: 'Pacific/Auckland' })
    try {
      await goTo(page, `/audit?subjectId=${member.memberId}`)
      const event = page.getByTestId('audit-event').first()
      await expect.poll(() => event.getByTestId('audit-action-label').textContent()).toContain('Suspended a membership')
      const changes = async () => (await event.getByTestId('audit-change').allTextContents()).map(t => t.replace(/\s+/g, ' ').trim())
      expect(await changes()).toContain('Status: Active → changed to Suspended')
      // The club's clock and format (Europe/London, "15 Jan 2026, 23:30"), not the viewer's in Auckland.
      // Written with Intl here, independently of the app's own formatter.
      const clubClock = new Intl.DateTimeFormat('en-GB', { timeZone: CLUB_TIME_ZONE, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
      await expect.poll(changes).toContain(`Suspended: — → changed to ${clubClock.format(row!.suspended_at)}`)
      const text = await page.getByTestId('audit-list').textContent()
      expect(text).not.toContain('member.suspend')
      expect(text).not.toContain('suspendedAt')
      expect(text).not.toMatch(/\d{4}-\d{2}-\d{2}T/)

      await page.getByTestId('audit-action').selectOption({ label: 'Suspended a membership' })
      await page.getByTestId('audit-filter').click()
      await page.waitForURL(url => url.searchParams.get('action') === 'member.suspend')
      await expect.poll(async () => (await page.getByTestId('audit-action-label').allTextContents()).map(t => t.trim()))
        .toEqual(['Suspended a membership'])
    }
    finally {
      await page.close()
    }
  })
})

describe('times in the club\'s time zone', () => {
  it('shows a member\'s suspension time as the club reads its clock, not the viewer\'s, and says which zone', async () => {
    const member = await makeMember({ suspendedReason: 'Time zone check (browser test)', suspendedAt: new Date('2026-01-15T23:30:00.000Z') })
    // A viewer half a world away from the club: 16 January there, 15 January at the club.
    const page = await signedInWith(DEMO.admin, { timezoneId: 'Pacific/Auckland' })
    try {
      await goTo(page, `/members/${member.memberId}`)
      const time = page.getByTestId('standing-suspension').locator('time')
      // 23:30 UTC is 23:30 in London in January (GMT, no summer time); Auckland would read 16 Jan, 12:30.
      await expect.poll(() => time.textContent()).toBe('15 Jan 2026, 23:30')
      expect(await time.getAttribute('title')).toBe(`The club's time (${CLUB_TIME_ZONE})`)
      expect(await page.getByTestId('standing-time-zone').textContent()).toContain(CLUB_TIME_ZONE)

      await goTo(page, `/audit?subjectId=${member.memberId}`)
      expect(await page.getByTestId('audit-time-zone').textContent()).toContain(CLUB_TIME_ZONE)
    }
    finally {
      await page.close()
    }
  })
})

describe('the shell', () => {
  it('phone menu: below the header, Escape closes it and returns focus to Menu, a tap outside closes it', async () => {
    const page = await signedInWith(DEMO.safety, { viewport: { width: 360, height: 740 } })
    try {
      const toggle = page.getByTestId('nav-toggle')
      const nav = page.getByTestId('main-nav')
      await toggle.click()
      await nav.waitFor()
      const header = (await page.locator('header').first().boundingBox())!
      const panel = (await nav.boundingBox())!
      expect(panel.y).toBeGreaterThanOrEqual(header.y + header.height - 1)

      await page.getByTestId('nav-standing').focus()
      await page.keyboard.press('Escape')
      await nav.waitFor({ state: 'hidden' })
      expect(await toggle.getAttribute('aria-expanded')).toBe('false')
      expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('nav-toggle')

      await toggle.click()
      await nav.waitFor()
      // A tap on the page below the open panel (the panel grows with the role's navigation).
      const open = (await nav.boundingBox())!
      const below = open.y + open.height + 10
      expect(below).toBeLessThan(740)
      await page.mouse.click(180, below)
      await nav.waitFor({ state: 'hidden' })
    }
    finally {
      await page.close()
    }
  })

  it('an unknown address shows the error page with its own title, the site name and a way back', async () => {
    const page = await signedInPage(DEMO.member, DEMO.password)
    try {
      await goTo(page, '/no-such-page-here')
      await page.getByTestId('error-page').waitFor()
      expect(await page.title()).toBe('Nothing here · Hoopwise')
      expect(await page.getByTestId('error-home').textContent()).toContain('Hoopwise')
      await page.getByTestId('error-back').click()
      await page.waitForURL(url => url.pathname === '/')
      await page.getByTestId('attention').waitFor()
    }
    finally {
      await page.close()
    }
  })
})
