import { describe, expect, it } from 'vitest'
import {
  VesselArithmeticError, axialStressMPa, barlowPressureMPa, hoopStressMPa, pressureAtHoopStressMPa, sphereStressMPa, thinWallCheck,
} from '../../../shared/utils/vessel-arithmetic'
import {
  J_PER_FT_LBF, M3_PER_FT3, MM_PER_INCH, PA_PER_BAR, PA_PER_PSI, STANDARD_ATMOSPHERE_PA, pressureFromPa, pressureToPa,
} from '../../../shared/utils/units'

describe('thin-wall cylinder stress (mechanics of materials, thin-walled pressure vessels)', () => {
  it('D 400 mm, t 20 mm, p 4.5 MPa: hoop 45.00 MPa, axial 22.50 MPa (σ = P·r/t, P·r/(2t), any strength-of-materials text)', () => {
    const shell = { pressureMPa: 4.5, radiusMm: 200, wallThicknessMm: 20 }
    expect(hoopStressMPa(shell)).toBeCloseTo(45.00, 2)
    expect(axialStressMPa(shell)).toBeCloseTo(22.50, 2)
  })

  it('an allowable 120 MPa on that shell allows 12.00 MPa (P = σ·t/r, mechanics of materials)', () => {
    expect(pressureAtHoopStressMPa({ stressMPa: 120, radiusMm: 200, wallThicknessMm: 20 })).toBeCloseTo(12.00, 2)
  })

  it('1.0 MPa, r 50 mm, t 1.0 mm: hoop 50.00 MPa, axial 25.00 MPa, sphere 25.00 MPa (mechanics of materials)', () => {
    const tube = { pressureMPa: 1.0, radiusMm: 50, wallThicknessMm: 1.0 }
    expect(hoopStressMPa(tube)).toBeCloseTo(50.00, 2)
    expect(axialStressMPa(tube)).toBeCloseTo(25.00, 2)
    expect(sphereStressMPa(tube)).toBeCloseTo(25.00, 2)
  })

  it.each([
    [200, 20, 10, true],
    [50, 1, 50, true],
    [20, 4, 5, false],
    [9.9, 1, 9.9, false],
  ])('r %d mm over t %d mm is r/t %d: thin-wall formulas hold: %s (valid when r/t ≥ 10, mechanics of materials)', (radiusMm, wallThicknessMm, ratio, thinWall) => {
    const check = thinWallCheck({ radiusMm, wallThicknessMm })
    expect(check.radiusToWallRatio).toBeCloseTo(ratio, 12)
    expect(check.thinWall).toBe(thinWall)
  })

  it('refuses a negative pressure, a zero wall and a NaN radius', () => {
    expect(() => hoopStressMPa({ pressureMPa: -1, radiusMm: 50, wallThicknessMm: 1 })).toThrow(VesselArithmeticError)
    expect(() => hoopStressMPa({ pressureMPa: 1, radiusMm: 50, wallThicknessMm: 0 })).toThrow(/wall thickness.*more than 0/)
    expect(() => thinWallCheck({ radiusMm: Number.NaN, wallThicknessMm: 1 })).toThrow(/must be a number/)
    expect(() => pressureAtHoopStressMPa({ stressMPa: Number.POSITIVE_INFINITY, radiusMm: 1, wallThicknessMm: 1 })).toThrow(/not infinity/)
  })
})

describe('Barlow\'s formula, P = 2·S·t/D (as piping codes use it)', () => {
  it('D 100 mm, t 1.0 mm, S 600 MPa → 12.00 MPa (120.0 bar)', () => {
    const burstMPa = barlowPressureMPa({ strengthMPa: 600, wallThicknessMm: 1.0, outsideDiameterMm: 100 })
    expect(burstMPa).toBeCloseTo(12.00, 2)
    expect(pressureFromPa(pressureToPa(burstMPa, 'MPa'), 'bar')).toBeCloseTo(120.0, 1)
  })

  it('4.5 in OD, 0.237 in wall, 35 000 psi → 3687 psi (Barlow; inches and psi through NIST SP 811 B.8)', () => {
    const strengthMPa = pressureFromPa(pressureToPa(35_000, 'psi'), 'MPa')
    const burstMPa = barlowPressureMPa({ strengthMPa, wallThicknessMm: 0.237 * MM_PER_INCH, outsideDiameterMm: 4.5 * MM_PER_INCH })
    expect(pressureFromPa(pressureToPa(burstMPa, 'MPa'), 'psi')).toBeCloseTo(3687, 0)
  })

  it('refuses a wall that leaves no bore, and a zero strength', () => {
    expect(() => barlowPressureMPa({ strengthMPa: 600, wallThicknessMm: 50, outsideDiameterMm: 100 })).toThrow(/no bore/)
    expect(() => barlowPressureMPa({ strengthMPa: 0, wallThicknessMm: 1, outsideDiameterMm: 100 })).toThrow(VesselArithmeticError)
  })
})

describe('units (NIST SP 811 (2008), Appendix B.8)', () => {
  it('holds the factors: 1 psi = 6.894 757 E+03 Pa, 1 bar = 1 E+05 Pa, 1 atm = 101 325 Pa, 1 in = 25.4 mm, 1 ft³ = 2.831 685 E-02 m³, 1 ft·lbf = 1.355 818 J', () => {
    expect(PA_PER_PSI).toBeCloseTo(6894.757, 3) // NIST SP 811 B.8
    expect(PA_PER_BAR).toBe(1e5) // NIST SP 811 B.8
    expect(STANDARD_ATMOSPHERE_PA).toBe(101_325) // NIST SP 811 B.8
    expect(MM_PER_INCH).toBe(25.4) // NIST SP 811 B.8
    expect(M3_PER_FT3).toBeCloseTo(2.831685e-2, 8) // NIST SP 811 B.8
    expect(J_PER_FT_LBF).toBeCloseTo(1.355818, 6) // NIST SP 811 B.8
  })

  it.each([
    ['150 psi = 10.34 bar', () => pressureFromPa(pressureToPa(150, 'psi'), 'bar'), 10.34, 2],
    ['10 bar = 145.0 psi', () => pressureFromPa(pressureToPa(10, 'bar'), 'psi'), 145.0, 1],
    ['1 atm = 14.70 psi', () => pressureFromPa(STANDARD_ATMOSPHERE_PA, 'psi'), 14.70, 2],
    ['10 bar gauge = 11.01 bar absolute (with 1.013 25 bar)', () => pressureFromPa(pressureToPa(10, 'bar') + STANDARD_ATMOSPHERE_PA, 'bar'), 11.01, 2],
    ['2.0 in = 50.80 mm', () => 2.0 * MM_PER_INCH, 50.80, 2],
    ['1 MPa = 10 bar', () => pressureFromPa(pressureToPa(1, 'MPa'), 'bar'), 10, 12],
    ['1 000 kPa = 10 bar', () => pressureFromPa(pressureToPa(1000, 'kPa'), 'bar'), 10, 12],
  ] as const)('%s (NIST SP 811 App. B.8)', (_label, compute, expected, digits) => {
    expect(compute()).toBeCloseTo(expected, digits)
  })
})
