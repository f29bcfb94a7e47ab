import { describe, it, expect } from 'vitest'
import { TOKEN_LIFETIME_HOURS, lifetimeWords, tokenLifetimeWords } from '../../../server/services/accounts/tokens'
import { NOTICE_KINDS, type NoticeVars } from '../../../server/services/notices/kinds'

describe('link lifetimes in words', () => {
  it.each([
    [1, '1 hour'],
    [2, '2 hours'],
    [24, '24 hours'],
    [48, '48 hours'],
    [72, '3 days'],
    [14 * 24, '14 days'],
    [50, '50 hours'],
  ])('%i hours → %s', (hours, words) => {
    expect(lifetimeWords(hours)).toBe(words)
  })

  const vars: NoticeVars = {
    clubName: 'Saltmarsh Rocketry Guild', memberName: 'Odile Marshcombe', baseUrl: 'https://rockets.saltmarsh.example',
    actionUrl: 'https://rockets.saltmarsh.example/action?token=abc', guardianName: 'Guardian of Odile',
  }

  it.each([
    ['email_verification', 'verify_email'],
    ['password_reset', 'reset_password'],
    ['guardian_consent', 'guardian_consent'],
  ] as const)('the %s e-mail quotes the lifetime of a %s link', (kind, purpose) => {
    const text = NOTICE_KINDS[kind].render(vars).text
    expect(text).toContain(`expires in ${tokenLifetimeWords(purpose)}`)
  })

  it('keeps the lifetimes the e-mails have always quoted', () => {
    expect(TOKEN_LIFETIME_HOURS).toEqual({ verify_email: 48, reset_password: 1, guardian_consent: 336 })
    expect(NOTICE_KINDS.guardian_consent.render(vars).text).toContain('expires in 14 days')
  })
})
