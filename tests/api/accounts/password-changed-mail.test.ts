import { describe, it, expect } from 'vitest'
import { api } from '../../support/http'
import { linkIn, mailsTo, waitForMail } from '../../support/mail'
import { sql } from '../../support/db'
import { makeMember, setMembership } from '../../support/factories'

const RESET_SUBJECT = /^Reset your .* password/
const CHANGED_SUBJECT = /^Your .* password was changed/

describe('after a password reset', () => {
  it('e-mails "your password was changed", a kind the member cannot switch off', async () => {
    const member = await makeMember()
    // Even a member who switched off every optional e-mail gets it.
    await setMembership(member.memberId, { noticeOptOuts: ['dues_reminder'] })
    expect((await api('/api/auth/password-reset-request', { body: { email: member.email } })).status).toBe(200)
    const token = linkIn(await waitForMail(member.email, RESET_SUBJECT), '/reset-password').searchParams.get('token')!
    expect((await mailsTo(member.email)).filter(m => CHANGED_SUBJECT.test(m.subject))).toHaveLength(0)

    const reset = await api('/api/auth/password-reset', { body: { token, password: 'a-much-longer-new-password-42' } })
    expect(reset.status).toBe(200)

    const mail = await waitForMail(member.email, CHANGED_SUBJECT)
    expect(mail.text).toContain(member.name)
    expect(mail.text).toMatch(/If it was not, ask for a new reset link at once/)
    // No opt-out link: the kind is not optional.
    expect(mail.text).not.toMatch(/opt-out|unsubscribe/i)
    const rows = await sql<{ kind: string, status: string }>(`SELECT kind, status FROM notices WHERE membership_id = $1 AND kind = 'password_changed'`,
      [member.memberId])
    expect(rows).toEqual([{ kind: 'password_changed', status: 'sent' }])
  })
})
