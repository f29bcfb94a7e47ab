import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, submitSignIn, goTo } from '../support/browser'
import { makeMember } from '../support/factories'
import { sql } from '../support/db'
import { DEMO } from '../support/test-env'
import { pseudonymName } from '../../shared/utils/pseudonym'

await setupBrowser()

describe('erasure on request from the member page', () => {
  it('an admin types the member\'s name and a reason, confirms once more, and the page shows the pseudonym', async () => {
    const tag = randomUUID().slice(0, 8)
    const member = await makeMember({ name: `Marram Cloudberry ${tag}`, phone: '+44 7700 900321' })
    const page = await createPage('/login')
    await submitSignIn(page, DEMO.admin, DEMO.password)
    await page.waitForURL(url => url.pathname === '/')
    await goTo(page, `/members/${member.memberId}`)
    await expect.poll(() => page.getByTestId('member-name').textContent()).toContain(member.name)

    await page.getByTestId('erase-open').click()
    const dialog = page.getByTestId('erase-dialog')
    // What stays and why is said before anything else.
    expect(await dialog.textContent()).toContain('The club must keep these safety and money records')
    await dialog.getByTestId('erase-confirm-name').fill(member.name)
    await dialog.getByTestId('erase-reason').fill('Asked by e-mail to be erased')
    await dialog.getByTestId('erase-submit').click()
    // The second step: nothing is erased until "Yes, erase".
    await expect.poll(() => dialog.getByTestId('erase-confirm-text').textContent()).toContain(`Erase ${member.name} for good?`)
    const [before] = await sql<{ name: string }>('SELECT name FROM users WHERE id = $1', [member.userId])
    expect(before!.name).toBe(member.name)
    await dialog.getByTestId('erase-submit').click()

    await expect.poll(() => page.getByTestId('member-name').textContent()).toContain(pseudonymName(member.memberId))
    expect(await page.getByTestId('member-status').textContent()).toBe('Resigned')
    expect(await page.getByTestId('erase-open').count()).toBe(0)
    // What the page shows (the first load's data payload is not shown).
    expect(await page.innerText('body')).not.toContain('900321')
    expect(await page.innerText('body')).not.toContain(member.email)
    await page.close()
  })
})
