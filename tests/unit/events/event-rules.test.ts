import { describe, expect, it } from 'vitest'
import { eventChangeProblem, eventFillLimitBar, gaugeCurrentThrough, gaugeState, registrationProblem, stationLaunchLimitBar, walkInProblem } from '../../../shared/utils/event-rules'

describe('a fill station\'s launch pressure', () => {
  it.each([
    [75, 3, 25],
    [60, 4, 15],
    // A factor below 3 is never used: the club's floor holds.
    [60, 2, 20],
  ])('%s bar ÷ %s → %s bar', (rating, factor, limit) => {
    expect(stationLaunchLimitBar(rating, factor)).toBe(limit)
  })
})

describe('a gauge\'s calibration', () => {
  it.each([
    ['2025-03-10', 12, '2026-03-10'],
    ['2024-02-29', 12, '2025-02-28'],
    ['2025-08-31', 6, '2026-02-28'],
  ])('calibrated %s every %s months is current through %s', (on, months, through) => {
    expect(gaugeCurrentThrough(on, months)).toBe(through)
  })

  it.each([
    ['2026-03-10', '2026-01-01', 'current'],
    ['2026-03-10', '2026-02-07', 'current'],
    ['2026-03-10', '2026-02-08', 'due_soon'],
    ['2026-03-10', '2026-03-10', 'due_soon'],
    ['2026-03-10', '2026-03-11', 'past_due'],
  ] as const)('current through %s, on %s: %s', (through, today, state) => {
    expect(gaugeState(through, today)).toBe(state)
  })
})

describe('registration and walk-ins', () => {
  const event = (heldOn: string, cancelled = false) => ({ heldOn, cancelled })
  it.each([
    ['2026-05-10', '2026-05-08', null],
    ['2026-05-10', '2026-05-09', null],
    ['2026-05-10', '2026-05-10', 'closes'],
    ['2026-05-10', '2026-05-11', 'closes'],
  ])('an event on %s, on %s: registration %s', (heldOn, today, problem) => {
    const answer = registrationProblem(event(heldOn), today)
    if (problem === null) expect(answer).toBeNull()
    else expect(answer).toMatch(/closes the day before/)
  })

  it('refuses registration for a cancelled event', () => {
    expect(registrationProblem(event('2026-05-10', true), '2026-05-01')).toMatch(/cancelled/)
  })

  it.each([
    ['2026-05-10', '2026-05-10', true],
    ['2026-05-10', '2026-05-09', false],
    ['2026-05-10', '2026-05-11', false],
  ])('an event on %s takes walk-ins on %s: %s', (heldOn, today, open) => {
    expect(walkInProblem(event(heldOn), today) === null).toBe(open)
  })

  it('keeps past and cancelled events as they were', () => {
    expect(eventChangeProblem(event('2026-05-10'), '2026-05-10')).toBeNull()
    expect(eventChangeProblem(event('2026-05-10'), '2026-05-11')).toMatch(/over/)
    expect(eventChangeProblem(event('2026-05-10', true), '2026-05-01')).toMatch(/cancelled/)
  })
})

describe('what a member may fill to at an event', () => {
  it.each([
    [10, 12, 10],
    [17, 12, 12],
    [null, 12, 0],
    [0, 12, 0],
  ])('tier cap %s, event cap %s → %s bar', (tier, cap, limit) => {
    expect(eventFillLimitBar(tier, cap)).toBe(limit)
  })
})
