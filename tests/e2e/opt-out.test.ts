import { describe, it, expect } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser } from '../support/browser'
import { makeMember } from '../support/factories'
import { api } from '../support/http'
import { sql } from '../support/db'
import { waitForMail, linkIn } from '../support/mail'

await setupBrowser()

describe('the opt-out page', () => {
  it('stops dues reminders from the e-mailed link without signing in, after a confirmation', async () => {
    const member = await makeMember({ paidDays: 11 })
    expect((await api('/api/outbox/run', { method: 'POST', as: 'admin' })).status).toBe(200)
    const link = linkIn(await waitForMail(member.email, /dues run out/), '/opt-out')

    const page = await createPage(`${link.pathname}${link.search}`)
    expect(await page.getByTestId('opt-out').textContent()).toContain('dues renewal reminder')
    // Opening the page changed nothing: mail programs' link scanners open pages too.
    const before = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(before[0]!.notice_opt_outs).toEqual([])

    await page.getByTestId('opt-out-confirm').click()
    await page.getByTestId('opt-out-done').waitFor()
    const after = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(after[0]!.notice_opt_outs).toEqual(['dues_reminder'])
    await page.close()
  })

  it('says so when the link was altered', async () => {
    const page = await createPage('/opt-out?token=00000000-0000-4000-8000-000000000000.dues_reminder.forged-signature')
    await page.getByTestId('opt-out-bad-link').waitFor()
    expect(await page.getByTestId('opt-out-confirm').count()).toBe(0)
    await page.close()
  })
})
