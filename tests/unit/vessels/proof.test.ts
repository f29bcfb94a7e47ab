import { describe, expect, it } from 'vitest'
import {
  DEFAULT_PROOF_POLICY, MIN_PROOF_MARGIN, VesselArithmeticError, constructionFamily, earliestProofDate, proofStanding, ratedFillBar,
} from '../../../shared/utils/vessel-arithmetic'
import { addCalendarMonths } from '../../../shared/utils/dates'

describe('rated fill = proof pressure ÷ the club\'s margin', () => {
  it('proof 24 bar, margin 1.5 → rated fill 16.00 bar (common practice: proof full of water to at least 1.5 × the fill)', () => {
    expect(ratedFillBar(24, 1.5)).toBeCloseTo(16.00, 2)
    expect(DEFAULT_PROOF_POLICY.marginRatio).toBe(1.5)
  })

  it('takes the club\'s margin down to 1.25 and refuses less (Hoopwise policy floor, not a standard)', () => {
    expect(MIN_PROOF_MARGIN).toBe(1.25)
    expect(ratedFillBar(20, 1.25)).toBeCloseTo(16, 12)
    expect(() => ratedFillBar(20, 1.2)).toThrow(/at least 1.25/)
    expect(() => ratedFillBar(0, 1.5)).toThrow(VesselArithmeticError)
    expect(() => ratedFillBar(Number.NaN, 1.5)).toThrow(/must be a number/)
    expect(() => ratedFillBar(20, Number.POSITIVE_INFINITY)).toThrow(/not infinity/)
  })
})

describe('calendar months (a record dated D with N months\' validity is current through D + N months, month-end clamped)', () => {
  it.each([
    ['2024-02-29', 12, '2025-02-28'],
    ['2025-08-31', 6, '2026-02-28'],
    ['2023-08-31', 6, '2024-02-29'],
    ['2025-01-15', 12, '2026-01-15'],
    ['2025-11-30', 3, '2026-02-28'],
  ])('%s + %d months = %s', (date, months, expected) => {
    expect(addCalendarMonths(date, months)).toBe(expected)
  })
})

describe('the cure clock and proof expiry (Hoopwise\'s starting policy; each club sets its own)', () => {
  it('the first proof may be recorded the cure wait after the last layup (default 7 days)', () => {
    expect(earliestProofDate('2026-02-25', DEFAULT_PROOF_POLICY.cureWaitDays)).toBe('2026-03-04')
    expect(() => earliestProofDate('2026-02-30', 7)).toThrow(/calendar date/)
    expect(() => earliestProofDate('2026-02-25', -1)).toThrow(/whole number/)
  })

  it('single and spliced bottles are bottles; the rest are laminates', () => {
    expect(constructionFamily('single_bottle')).toBe('bottle')
    expect(constructionFamily('spliced_bottles')).toBe('bottle')
    expect(constructionFamily('overwrapped_liner')).toBe('laminate')
    expect(constructionFamily('mandrel_tube')).toBe('laminate')
    expect(constructionFamily('other')).toBe('laminate')
  })

  it.each([
    ['single_bottle', '2025-03-10', '2026-03-10'],
    ['spliced_bottles', '2025-03-10', '2025-09-10'],
    ['overwrapped_liner', '2025-08-31', '2026-08-31'],
  ] as const)('a %s proved on %s is current through %s', (construction, testedOn, through) => {
    const base = { testedOn, construction, fillsSinceProof: 0 }
    expect(proofStanding({ ...base, today: through })).toMatchObject({ validThroughDate: through, lapsed: false, reasons: [] })
    const dayAfter = new Date(Date.parse(`${through}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10)
    const late = proofStanding({ ...base, today: dayAfter })
    expect(late.lapsed).toBe(true)
    expect(late.reasons.map(r => r.code)).toEqual(['PROOF_INTERVAL_PASSED'])
    expect(late.reasons[0]!.message).toContain(through)
  })

  it.each([
    ['single_bottle', 10],
    ['overwrapped_liner', 25],
  ] as const)('a %s allows fills up to %d: the fill that reaches the limit is allowed, the next is not', (construction, limit) => {
    const at = (fillsSinceProof: number) => proofStanding({ testedOn: '2026-01-10', construction, fillsSinceProof, today: '2026-02-01' })
    expect(at(limit - 1)).toMatchObject({ lapsed: false, fillsRemaining: 1, fillLimit: limit })
    expect(at(limit)).toMatchObject({ lapsed: true, fillsRemaining: 0 })
    expect(at(limit).reasons.map(r => r.code)).toEqual(['PROOF_FILL_LIMIT_REACHED'])
  })

  it('a repair, crash, incident or heat exposure after the test ends the proof at once; one on the test day or later than today does not', () => {
    const base = { testedOn: '2026-01-10', construction: 'mandrel_tube' as const, fillsSinceProof: 3, today: '2026-02-01' }
    expect(proofStanding({ ...base, events: [{ kind: 'repair', on: '2026-01-10' }] }).lapsed).toBe(false)
    expect(proofStanding({ ...base, events: [{ kind: 'crash', on: '2026-02-02' }] }).lapsed).toBe(false)
    const heated = proofStanding({ ...base, events: [{ kind: 'heat_exposure', on: '2026-01-20' }, { kind: 'crash', on: '2026-01-15' }] })
    expect(heated.lapsed).toBe(true)
    expect(heated.reasons).toEqual([{ code: 'PROOF_INVALIDATED', message: expect.stringMatching(/2026-01-15 with a crash/) }])
  })

  it('lists every reason that applies, and takes the club\'s own interval and fill limit', () => {
    const all = proofStanding({
      testedOn: '2025-01-10', construction: 'single_bottle', fillsSinceProof: 4, today: '2025-05-11',
      intervalMonths: 4, fillLimit: 4, events: [{ kind: 'damage', on: '2025-03-01' }],
    })
    expect(all.validThroughDate).toBe('2025-05-10')
    expect(all.reasons.map(r => r.code)).toEqual(['PROOF_INTERVAL_PASSED', 'PROOF_FILL_LIMIT_REACHED', 'PROOF_INVALIDATED'])
  })

  it.each([
    ['a malformed test date', { testedOn: '10/01/2026' }, /YYYY-MM-DD/],
    ['a negative fill count', { fillsSinceProof: -1 }, /whole number/],
    ['an interval of 0 months', { intervalMonths: 0 }, /whole number of at least 1/],
    ['an unknown construction', { construction: 'balloon' }, /Unknown construction/],
    ['an unknown event', { events: [{ kind: 'mood', on: '2026-01-20' }] }, /Unknown event/],
  ])('refuses %s', (_label, change, message) => {
    const base = { testedOn: '2026-01-10', construction: 'single_bottle', fillsSinceProof: 0, today: '2026-02-01' }
    expect(() => proofStanding({ ...base, ...change } as Parameters<typeof proofStanding>[0])).toThrow(message)
  })
})
