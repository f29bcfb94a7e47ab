import { beforeEach, describe, expect, it } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import { useUnitsStore } from '../../stores/units'
import { PA_PER_BAR, PA_PER_PSI, barToPsi, formatPressureLimit, psiToBar } from '../../shared/utils/units'

describe('the units store', () => {
  beforeEach(() => {
    setActivePinia(createPinia())
  })

  it('uses NIST SP 811\'s factor: 1 psi = 6 894.757 293 168 Pa, so 1 bar ≈ 14.503 77 psi', () => {
    expect(PA_PER_PSI).toBe(6894.757293168) // NIST SP 811 (2008) App. B.8
    expect(PA_PER_BAR / PA_PER_PSI).toBeCloseTo(14.503774, 6)
  })

  // Check values from NIST SP 811 (2008), Appendix B (conversion factors).
  it.each([
    ['150 psi = 10.34 bar', () => psiToBar(150), 10.34, 2],
    ['10 bar = 145.0 psi', () => barToPsi(10), 145.0, 1],
    ['1 atm (101 325 Pa) = 14.70 psi', () => barToPsi(1.01325), 14.70, 2],
  ] as const)('%s (NIST SP 811 App. B)', (_label, compute, expected, digits) => {
    expect(compute()).toBeCloseTo(expected, digits)
  })

  it('converts there and back without drift', () => {
    expect(psiToBar(barToPsi(17))).toBeCloseTo(17, 12)
  })

  it.each([
    ['bar', 6, { main: '6.0 bar', other: '87 psi' }],
    ['psi', 6, { main: '87 psi', other: '6.0 bar' }],
    ['bar', 6.894757, { main: '6.9 bar', other: '100 psi' }],
    ['psi', 17, { main: '247 psi', other: '17.0 bar' }],
  ] as const)('with %s first shows %d bar as %j', (unit, bar, expected) => {
    const units = useUnitsStore()
    units.setPreference(unit)
    expect(units.show(bar)).toEqual(expected)
    expect(units.other).toBe(unit === 'bar' ? 'psi' : 'bar')
  })

  it('starts with bar', () => {
    expect(useUnitsStore().preference).toBe('bar')
  })
})

describe('formatPressureLimit: a limit is shown rounded down, never up', () => {
  it.each([
    // Conversions by NIST SP 811 B.8 (1 psi = 6 894.757 Pa): 9.99 bar = 144.89 psi.
    [9.99, 'bar', '9.99 bar'],
    [9.99, 'psi', '144 psi'],
    [10, 'psi', '145 psi'], // 145.04 psi
    [10.666, 'bar', '10.66 bar'],
    [psiToBar(145), 'psi', '145 psi'], // on the step: float noise does not drop it to 144
    [0.004, 'bar', '0.00 bar'],
  ] as const)('%s bar in %s → %s', (bar, unit, shown) => {
    expect(formatPressureLimit(bar, unit)).toBe(shown)
  })
})
