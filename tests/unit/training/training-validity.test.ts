import { describe, expect, it } from 'vitest'
import { courseStanding, isCurrentStanding, trainingExpiresOn } from '../../../shared/utils/training-validity'

describe('trainingExpiresOn: a record dated D with N months is current through D + N calendar months', () => {
  it.each([
    // 29 CFR 1910.134(f)(2): a respirator fit test at least every 12 months; 2024-03-01 → due 2025-03-01.
    ['2024-03-01', 12, '2025-03-01'],
    // The project's month-end clamp: 29 February + 12 months = 28 February.
    ['2024-02-29', 12, '2025-02-28'],
    ['2024-02-29', 48, '2028-02-29'],
    ['2025-08-31', 6, '2026-02-28'],
    ['2023-08-31', 6, '2024-02-29'],
    ['2026-01-31', 1, '2026-02-28'],
    ['2026-12-03', 24, '2028-12-03'],
  ])('%s + %i months → %s', (trainedOn, months, expiresOn) => {
    expect(trainingExpiresOn(trainedOn, months)).toBe(expiresOn)
  })

  it.each([0, -1, 1.5, Number.NaN])('refuses a validity of %s months', (months) => {
    expect(() => trainingExpiresOn('2026-01-01', months)).toThrow(/whole number of months/)
  })
})

describe('courseStanding on the club\'s today', () => {
  const today = '2026-12-03'
  it.each([
    [null, 'never_taken'],
    [{ expiresOn: '2026-12-02', retrainingRequired: false }, 'expired'],
    [{ expiresOn: '2026-12-03', retrainingRequired: false }, 'expiring'], // current through its expiry day, inclusive
    [{ expiresOn: '2027-02-01', retrainingRequired: false }, 'expiring'], // 60 days ahead: still "within 60 days"
    [{ expiresOn: '2027-02-02', retrainingRequired: false }, 'current'],
    [{ expiresOn: '2028-01-01', retrainingRequired: true }, 'retraining_required'],
  ] as const)('%o → %s', (latest, standing) => {
    expect(courseStanding(latest, today)).toBe(standing)
  })

  it('counts current and expiring as current, nothing else', () => {
    expect(['current', 'expiring', 'expired', 'retraining_required', 'never_taken'].filter(s => isCurrentStanding(s as never))).toEqual(['current', 'expiring'])
  })
})
