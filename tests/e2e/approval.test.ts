import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, submitSignIn, goTo } from '../support/browser'
import { clubDay, makeMember, NOW, setMembership, setUser } from '../support/factories'
import { DEMO } from '../support/test-env'

await setupBrowser()

describe('the member page before approval', () => {
  it('says what a junior\'s sign-up waits for instead of offering approval, and offers it once both are there', async () => {
    const tag = randomUUID().slice(0, 8)
    const name = `Fenn Oysterby ${tag}`
    const junior = await makeMember({
      name, approved: false, paidDays: null, verified: false,
      birthDate: clubDay(-14 * 365), guardianName: 'Ilse Oysterby', guardianEmail: `guardian-${tag}@test.hoopwise.example`,
    })
    const page = await createPage('/login')
    await submitSignIn(page, DEMO.admin, DEMO.password)
    await page.waitForURL(url => url.pathname === '/')
    await goTo(page, `/members/${junior.memberId}`)

    const waits = page.getByTestId('approval-waits')
    await expect.poll(() => waits.textContent()).toContain('Not ready for approval yet')
    expect(await page.getByTestId('approval-wait-EMAIL_NOT_CONFIRMED').textContent()).toContain(`${name} has not confirmed their e-mail address yet`)
    expect(await page.getByTestId('approval-wait-GUARDIAN_CONSENT_MISSING').textContent()).toContain('approval waits for their parent or guardian to consent')
    expect(await page.getByTestId('action-approve').count()).toBe(0)

    await setUser(junior.userId, { emailVerifiedAt: NOW })
    await setMembership(junior.memberId, { guardianConsentAt: NOW })
    await page.reload()
    await expect.poll(() => page.getByTestId('action-approve').count()).toBe(1)
    expect(await page.getByTestId('approval-waits').count()).toBe(0)
    await page.close()
  })

  it('the waiver page asks a member with an unconfirmed e-mail to confirm it before accepting', async () => {
    const member = await makeMember({ verified: false, acceptWaiver: false })
    const page = await createPage('/login')
    await submitSignIn(page, member.email, member.password)
    await page.waitForURL(url => url.pathname === '/')
    await goTo(page, '/waiver')
    await expect.poll(() => page.getByTestId('waiver-needs-email').textContent()).toContain('Confirm your e-mail address first')
    expect(await page.getByTestId('waiver-accept-form').count()).toBe(0)
    await page.close()
  })
})
