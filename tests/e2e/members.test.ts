import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, submitSignIn, goTo } from '../support/browser'
import { clubDay, makeMember } from '../support/factories'
import { waitForMail } from '../support/mail'
import { sql } from '../support/db'
import { DEMO } from '../support/test-env'

await setupBrowser()

async function signInAsAdmin(viewport?: { width: number, height: number }) {
  const page = await createPage('/login', viewport ? { viewport } : undefined)
  await submitSignIn(page, DEMO.admin, DEMO.password)
  await page.waitForURL(url => url.pathname === '/')
  return page
}

describe('the member directory and member page', () => {
  it('an admin searches, opens a member, suspends them with a reason after confirming, and sees the status change', async () => {
    const tag = randomUUID().slice(0, 8)
    const member = await makeMember({ name: `Wrenna Tidepool ${tag}` })
    const page = await signInAsAdmin()

    await goTo(page, '/members')
    await page.getByTestId('member-search').fill(`tidepool ${tag}`)
    // The search is debounced and lands in the URL, so the view can be shared.
    await page.waitForURL(url => url.searchParams.get('q') === `tidepool ${tag}`)
    const rows = page.getByTestId('member-row')
    await expect.poll(() => rows.count()).toBe(1)
    await expect.poll(() => page.getByTestId('members-total').textContent()).toContain('1 member')
    await expect.poll(() => rows.first().getByTestId('status-active').textContent()).toBe('Active')

    await page.getByTestId(`member-link-${member.memberId}`).click()
    await page.waitForURL(url => url.pathname === `/members/${member.memberId}`)
    await expect.poll(() => page.getByTestId('member-name').textContent()).toContain(member.name)
    expect(await page.getByTestId('member-status').textContent()).toBe('Active')

    await page.getByTestId('action-suspend').click()
    const dialog = page.getByTestId('action-dialog')
    await dialog.getByTestId('action-submit').click()
    await expect.poll(() => dialog.getByTestId('error-reason').isVisible()).toBe(true)
    await dialog.getByTestId('action-reason').fill('Filled above the event cap at the spring launch')
    await dialog.getByTestId('action-submit').click()
    // A destructive action asks once more before it goes through.
    await expect.poll(() => dialog.getByTestId('action-confirm-text').textContent()).toContain(`Suspend ${member.name}?`)
    const [before] = await sql<{ suspended_at: Date | null }>(`SELECT suspended_at FROM memberships WHERE id = $1`, [member.memberId])
    expect(before!.suspended_at).toBeNull()
    await dialog.getByTestId('action-submit').click()

    await expect.poll(() => page.getByTestId('member-status').textContent()).toBe('Suspended')
    expect(await page.getByTestId('standing-suspension').textContent()).toContain('Filled above the event cap at the spring launch')
    expect(await dialog.isVisible()).toBe(false)
    expect(await page.getByTestId('action-reinstate').isVisible()).toBe(true)
    const [after] = await sql<{ suspended_reason: string }>(`SELECT suspended_reason FROM memberships WHERE id = $1`, [member.memberId])
    expect(after!.suspended_reason).toBe('Filled above the event cap at the spring launch')

    // Back in the directory the same search now shows the suspension as text.
    await page.goBack()
    await page.waitForURL(url => url.pathname === '/members')
    await expect.poll(() => page.getByTestId('member-row').first().getByTestId('status-suspended').textContent()).toBe('Suspended')
    await page.close()
  })

  it('an admin re-sends a junior\'s consent link, then changes the guardian with a reason after the form asks for an e-mail', async () => {
    const tag = randomUUID().slice(0, 8)
    const guardianEmail = `guardian-${tag}@test.hoopwise.example`
    const junior = await makeMember({ name: `Pip Saltreed ${tag}`, birthDate: clubDay(-13 * 365), guardianName: 'Rowan Saltreed', guardianEmail })
    const page = await signInAsAdmin()
    await goTo(page, `/members/${junior.memberId}`)

    await page.getByTestId('action-guardian-consent').click()
    const dialog = page.getByTestId('action-dialog')
    await dialog.getByTestId('action-reason').fill('The first link expired')
    await dialog.getByTestId('action-submit').click()
    await expect.poll(() => page.getByTestId('form-ok').textContent()).toContain(`A fresh consent link is on its way to ${guardianEmail}`)
    await waitForMail(guardianEmail, /asks for your consent/)

    await page.getByTestId('edit-open').click()
    const form = page.getByTestId('member-edit-form')
    await form.getByTestId('field-guardianEmail').fill('')
    await form.getByTestId('edit-save').click()
    await expect.poll(() => form.getByTestId('error-guardianEmail').textContent()).toContain('guardian\'s e-mail')
    const next = `guardian-new-${tag}@test.hoopwise.example`
    await form.getByTestId('field-guardianEmail').fill(next)
    await form.getByTestId('field-reason').fill('The family asked for the other parent')
    await form.getByTestId('edit-save').click()
    await expect.poll(() => page.getByTestId('standing-guardian').textContent()).toContain(next)
    expect(await page.getByTestId('standing-guardian').textContent()).toContain('Consent not confirmed yet')
    const [edit] = await sql<{ reason: string }>(`SELECT reason FROM audit_events WHERE subject_id = $1 AND action = 'member.edit'`, [junior.memberId])
    expect(edit!.reason).toBe('The family asked for the other parent')
    await waitForMail(next, /asks for your consent/)
    await page.close()
  })

  it('sorts by a column header, keeps it in the URL and marks the header with aria-sort', async () => {
    const page = await signInAsAdmin()
    await goTo(page, '/members?pageSize=10')
    const header = page.locator('th', { has: page.getByTestId('sort-paidThrough') })
    expect(await header.getAttribute('aria-sort')).toBe('none')
    await page.getByTestId('sort-paidThrough').click()
    await page.waitForURL(url => url.searchParams.get('sort') === 'paidThrough')
    await expect.poll(() => header.getAttribute('aria-sort')).toBe('ascending')
    await page.getByTestId('sort-paidThrough').click()
    await page.waitForURL(url => url.searchParams.get('dir') === 'desc')
    await expect.poll(() => header.getAttribute('aria-sort')).toBe('descending')
    await expect.poll(() => page.getByTestId('member-row').count()).toBe(10)
    await page.getByTestId('pager-next').click()
    await page.waitForURL(url => url.searchParams.get('page') === '2')
    expect(await page.getByTestId('pager-status').textContent()).toMatch(/11–20 of \d+/)
    await page.close()
  })

  it('on a 360 px phone shows the members as cards with their own sort control, without sideways scrolling', async () => {
    const page = await signInAsAdmin({ width: 360, height: 780 })
    await goTo(page, '/members?pageSize=10')
    await expect.poll(() => page.getByTestId('member-row').count()).toBe(10)
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360)
    expect(await page.getByTestId('sort-name').isVisible()).toBe(false)
    await page.getByTestId('member-sort').selectOption('joined:desc')
    await page.waitForURL(url => url.searchParams.get('sort') === 'joined' && url.searchParams.get('dir') === 'desc')
    expect(await page.getByTestId('member-row').first().textContent()).toContain('Joined')
    await page.close()
  })
})
