import { describe, expect, it } from 'vitest'
import { duesRefusals, paidThroughAfterRefund, periodStartsOn, planAudienceFor, renewedPaidThrough } from '#shared/utils/dues-renewal'
import { membershipStatus } from '#shared/utils/membership-status'

describe('renewedPaidThrough', () => {
  it.each([
    // early renewal: the remaining days are kept (extends from the old paid-through date)
    ['early', '2026-09-30', '2026-09-01', 12, '2027-09-30'],
    ['on the last day', '2026-09-01', '2026-09-01', 12, '2027-09-01'],
    // late renewal (grace or lapsed): from the payment's date
    ['in grace', '2026-08-20', '2026-09-01', 12, '2027-09-01'],
    ['lapsed', '2025-01-31', '2026-09-01', 12, '2027-09-01'],
    ['first dues', null, '2026-09-01', 12, '2027-09-01'],
    // month-end clamp: 29 February + 12 months = 28 February
    ['29 February, late', null, '2028-02-29', 12, '2029-02-28'],
    ['29 February, early', '2028-02-29', '2028-01-10', 12, '2029-02-28'],
    ['31 August + 6 months', '2026-08-31', '2026-08-01', 6, '2027-02-28'],
  ])('%s: paid through %s, paid on %s, %i months → %s', (_l, current, paidOn, months, expected) => {
    expect(renewedPaidThrough(current, paidOn, months)).toBe(expected)
  })
})

describe('paidThroughAfterRefund', () => {
  it('returns to the date the refunded payment replaced', () => {
    const before = '2026-09-30'
    const after = renewedPaidThrough(before, '2026-09-01', 12)
    expect(paidThroughAfterRefund({ before, after }, after)).toEqual({ restored: before })
  })
  it('a refunded first payment leaves the member never paid', () => {
    expect(paidThroughAfterRefund({ before: null, after: '2027-09-01' }, '2027-09-01')).toEqual({ restored: null })
  })
  it('refuses when a later payment moved paid-through since (only the latest payment)', () => {
    expect(paidThroughAfterRefund({ before: '2026-09-30', after: '2027-09-30' }, '2028-09-30')).toBeNull()
  })
  it('a restored date in the past makes the member lapsed again through the one status function', () => {
    const restored = paidThroughAfterRefund({ before: '2025-01-31', after: '2027-09-01' }, '2027-09-01')!.restored
    expect(membershipStatus({ paidThrough: restored }, { timeZone: 'UTC', now: new Date('2026-09-02T12:00:00Z') })).toBe('lapsed')
  })
})

describe('who may pay', () => {
  it.each([
    ['pending', null, ['AWAITING_APPROVAL']],
    ['pending', '2026-01-01', []],
    ['active', '2026-01-01', []],
    ['grace', '2026-01-01', []],
    ['lapsed', '2026-01-01', []],
    ['suspended', '2026-01-01', ['SUSPENDED']],
    ['resigned', '2026-01-01', ['RESIGNED']],
  ] as const)('%s (approved %s) → %j', (status, approvedAt, codes) => {
    expect(duesRefusals(status, approvedAt).map(r => r.code)).toEqual(codes)
  })
  it.each([
    ['2009-09-02', '2026-09-01', 'junior'], // 17 on the payment date
    ['2008-09-01', '2026-09-01', 'adult'], // 18 that day
    [null, '2026-09-01', 'adult'],
  ])('born %s, paying on %s → %s plans', (birth, today, audience) => {
    expect(planAudienceFor(birth, today)).toBe(audience)
  })
})

describe('periodStartsOn', () => {
  it.each([
    ['2026-09-30', '2026-09-01', '2026-10-01'], // early: the day after the old paid-through date
    ['2026-09-01', '2026-09-01', '2026-09-02'],
    ['2026-08-20', '2026-09-01', '2026-09-01'], // late: the payment's date
    [null, '2026-09-01', '2026-09-01'],
  ])('paid through %s, paid on %s → covers from %s', (before, paidOn, from) => {
    expect(periodStartsOn(before, paidOn)).toBe(from)
  })
})
