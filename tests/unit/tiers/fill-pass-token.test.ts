import { describe, expect, it } from 'vitest'
import { deriveFillPassKey, FILL_PASS_TOKEN_LENGTH, fillPassToken, readFillPassToken } from '../../../server/services/tiers/fill-pass-token'
import { deriveOptOutKey } from '../../../server/services/notices/opt-out'
import { formatPermittedMax, tagFromScan, tokenFromScan } from '../../../shared/utils/fill-desk'

const key = deriveFillPassKey('a-session-secret-of-at-least-32-characters')
const id = '3f2504e0-4f89-41d3-9a0c-0305e82c3301'

describe('fill-pass tokens', () => {
  it('carry the pass id back out, and are 43 URL-safe characters', () => {
    const token = fillPassToken(key, id)
    expect(token).toHaveLength(FILL_PASS_TOKEN_LENGTH)
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/)
    expect(readFillPassToken(key, token)).toBe(id)
    expect(readFillPassToken(key, fillPassToken(key, id.toUpperCase()))).toBe(id)
  })

  it('refuse a token signed with another key (another server secret, or the opt-out key)', () => {
    expect(readFillPassToken(deriveFillPassKey('another-session-secret-of-32-characters!'), fillPassToken(key, id))).toBeNull()
    expect(readFillPassToken(key, fillPassToken(deriveOptOutKey('a-session-secret-of-at-least-32-characters'), id))).toBeNull()
  })

  it.each([
    ['one character changed in the id part', (t: string) => `${t[0] === 'A' ? 'B' : 'A'}${t.slice(1)}`],
    ['one character changed in the signature', (t: string) => `${t.slice(0, 42)}${t[42] === 'A' ? 'Q' : 'A'}`],
    ['cut short', (t: string) => t.slice(0, 42)],
    ['one character more', (t: string) => `${t}A`],
    ['not base64url', (t: string) => `${t.slice(0, 42)}*`],
    ['empty', () => ''],
  ])('refuse a token %s', (_, change) => {
    expect(readFillPassToken(key, change(fillPassToken(key, id)))).toBeNull()
  })

  it('sign another pass id differently (the signature is not reusable)', () => {
    const other = 'a0eebc99-9c0b-4ef8-bb6d-6bb9bd380a11'
    const t1 = fillPassToken(key, id)
    const t2 = fillPassToken(key, other)
    expect(t1.slice(22)).not.toBe(t2.slice(22))
    // The first pass's signature pasted behind the second pass's id is refused.
    const spliced = Buffer.concat([Buffer.from(t2, 'base64url').subarray(0, 16), Buffer.from(t1, 'base64url').subarray(16)]).toString('base64url')
    expect(readFillPassToken(key, spliced)).toBeNull()
  })

  it('refuse to sign something that is not a UUID', () => {
    expect(() => fillPassToken(key, 'not-a-uuid')).toThrow()
  })
})

describe('what the fill page reads from a scanned code', () => {
  const token = fillPassToken(key, id)
  it.each([
    [`https://club.example.org/verify/${token}`, token],
    [`https://club.example.org/verify/${token}/`, token],
    [`  ${token}  `, token],
    ['https://club.example.org/verify/short', null],
    [`https://club.example.org/vessels/${token}`, null],
  ])('fill pass %s → %s', (text, expected) => {
    expect(tokenFromScan(text)).toBe(expected)
  })

  it.each([
    ['https://club.example.org/vessels/SRG-0042', 'SRG-0042'],
    ['https://club.example.org/vessels/srg-0042?x=1', 'SRG-0042'],
    ['srg-0042', 'SRG-0042'],
    ['https://club.example.org/verify/SRG-0042', null],
    ['hello', null],
  ])('vessel label %s → %s', (text, expected) => {
    expect(tagFromScan(text)).toBe(expected)
  })
})

describe('formatPermittedMax: a limit shown rounded down', () => {
  it.each([
    [9.99, 'bar', '9.9 bar'],
    [9.3, 'bar', '9.3 bar'],
    [10, 'bar', '10.0 bar'],
    [0, 'bar', '0.0 bar'],
    // 6 bar = 87.02 psi (1 psi = 6894.757 Pa, NIST SP 811): shown as 87, never 88.
    [6, 'psi', '87 psi'],
  ] as const)('%s bar in %s → %s', (bar, unit, shown) => {
    expect(formatPermittedMax(bar, unit)).toBe(shown)
  })
})
