import { describe, it, expect } from 'vitest'
import { safeNextPath } from '../../shared/utils/redirect'
import { clubBaseUrl, clubToday } from '../../server/services/clubs/clubs'
import { TOKEN_LIFETIME_HOURS, lifetimeWords, tokenLifetimeWords } from '../../server/services/accounts/tokens'
import { NOTICE_KINDS, type NoticeVars } from '../../server/services/notices/kinds'

describe('safeNextPath (where sign-in goes next)', () => {
  it.each([
    ['/members', '/members'],
    ['/members/abc?tab=roles#top', '/members/abc?tab=roles#top'],
    ['/', '/'],
    ['/verify-email', '/verify-email'],
  ])('keeps the in-site path %s', (next, expected) => {
    expect(safeNextPath(next)).toBe(expected)
  })

  it.each([
    ['//evil.example', 'protocol-relative address'],
    ['//evil.example/members', 'protocol-relative address with a path'],
    ['/\\evil.example', 'backslash that browsers read as a slash'],
    ['https://evil.example/', 'absolute address'],
    ['javascript:alert(1)', 'script address'],
    ['members', 'relative path'],
    ['', 'empty'],
  ])('sends %s (%s) to /', (next) => {
    expect(safeNextPath(next)).toBe('/')
  })

  it('ignores a repeated or missing query parameter', () => {
    expect(safeNextPath(['/members', '/audit'])).toBe('/')
    expect(safeNextPath(undefined)).toBe('/')
    expect(safeNextPath(null)).toBe('/')
  })
})

describe('club helpers', () => {
  it.each([
    ['https://rockets.saltmarsh.example', 'https://rockets.saltmarsh.example'],
    ['https://rockets.saltmarsh.example/', 'https://rockets.saltmarsh.example'],
    ['https://rockets.saltmarsh.example/club//', 'https://rockets.saltmarsh.example/club'],
  ])('clubBaseUrl(%s) → %s', (publicUrl, expected) => {
    expect(clubBaseUrl({ publicUrl })).toBe(expected)
  })

  it('takes today in the club\'s time zone, not the server\'s', () => {
    // 23:30 UTC on 14 March is already 15 March in Auckland (UTC+13) and still 14 March in London.
    const instant = new Date('2026-03-14T23:30:00Z')
    expect(clubToday({ timeZone: 'Pacific/Auckland' }, instant)).toBe('2026-03-15')
    expect(clubToday({ timeZone: 'Europe/London' }, instant)).toBe('2026-03-14')
  })
})

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
