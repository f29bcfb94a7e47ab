import { describe, expect, it } from 'vitest'
import {
  DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION, VesselArithmeticError, calibrationFactor, laminateBurstEstimate, layupBurstEstimate,
  layupFamilyKey, parseLayupFamilyKey, resinKey,
} from '../../../shared/utils/vessel-arithmetic'

// Checks of the arithmetic, not of reality: every expected value is worked by hand beside its assertion.

describe('calibrationFactor: median of measured ÷ estimated, with count, min and max (arithmetic check)', () => {
  it.each([
    ['one coupon', [1.25], { median: 1.25, count: 1, min: 1.25, max: 1.25 }],
    // sorted 0.8, 1.0, 1.2 → the middle one
    ['an odd count', [1.2, 0.8, 1.0], { median: 1.0, count: 3, min: 0.8, max: 1.2 }],
    // sorted 0.7, 0.9, 1.1, 1.3 → (0.9 + 1.1) / 2 = 1.0
    ['an even count (mean of the middle two)', [0.9, 1.3, 0.7, 1.1], { median: 1.0, count: 4, min: 0.7, max: 1.3 }],
    // sorted 0.5, 0.6, 0.62, 3.0 → (0.6 + 0.62) / 2 = 0.61; one odd coupon barely moves the median
    ['one outlier', [0.6, 3.0, 0.5, 0.62], { median: 0.61, count: 4, min: 0.5, max: 3.0 }],
  ])('%s', (_label, ratios, expected) => {
    const factor = calibrationFactor(ratios)
    expect(factor.median).toBeCloseTo(expected.median, 12)
    expect({ ...factor, median: expected.median }).toEqual(expected)
  })

  it('leaves the caller\'s list in its order', () => {
    const ratios = [1.2, 0.8, 1.0]
    calibrationFactor(ratios)
    expect(ratios).toEqual([1.2, 0.8, 1.0])
  })

  it.each([
    ['no coupons', [], /at least one coupon/],
    ['a NaN ratio', [1, Number.NaN], /must be a number/],
    ['an infinite ratio', [Number.POSITIVE_INFINITY], /not infinity/],
    ['a zero ratio', [1, 0], /more than 0/],
    ['a negative ratio', [-0.5], /more than 0/],
  ])('refuses %s', (_label, ratios, message) => {
    expect(() => calibrationFactor(ratios)).toThrow(VesselArithmeticError)
    expect(() => calibrationFactor(ratios)).toThrow(message)
  })
})

describe('layupBurstEstimate: the laminate estimate with the fibre class\'s generic strength and density', () => {
  it('3 plies of 300 g/m² E-glass woven (σf 3 450 MPa, ρf 2.54) at the default Vf 0.35 on 100 mm → 61.12 bar', () => {
    // Arithmetic check: t = 3 × 300/(2.54 × 0.35) µm = 1.01237 mm; σ_hoop = 3450 × 0.35 × 0.5 × 0.5 = 301.875 MPa;
    // P = 2 × 1.01237 × 301.875 / 100 = 6.1122 MPa = 61.12 bar. Vf 0.35 is common practice for hand layup.
    expect(DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION).toBe(0.35)
    const e = layupBurstEstimate({ fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3, layupDiameterMm: 100 })
    expect(e.laminateThicknessMm).toBeCloseTo(1.01237, 5)
    expect(e.hoopStrengthMPa).toBeCloseTo(301.875, 9)
    expect(e.burstPressureBar).toBeCloseTo(61.122, 3)
    expect(e.estimate).toBe(true)
  })

  it('4 plies of 200 g/m² carbon woven (σf 2 500 MPa, ρf 1.80) on 90 mm → 61.73 bar', () => {
    // Arithmetic check: t = 4 × 200/(1.80 × 0.35) µm = 1.26984 mm; σ_hoop = 2500 × 0.35 × 0.25 = 218.75 MPa;
    // P = 2 × 1.26984 × 218.75 / 90 = 6.1728 MPa.
    expect(layupBurstEstimate({ fibreClass: 'carbon', arealWeightGPerM2: 200, weave: 'woven_0_90', plies: 4, layupDiameterMm: 90 }).burstPressureBar).toBeCloseTo(61.728, 3)
  })

  it('2 layers of 300 g/m² carbon hoop tow on 60 mm → 138.89 bar; a measured Vf and the club\'s k_process pass through', () => {
    // Arithmetic check: t = 2 × 300/(1.80 × 0.35) µm = 0.95238 mm; σ_hoop = 2500 × 0.35 × 1.0 × 0.5 = 437.5 MPa;
    // P = 2 × 0.95238 × 437.5 / 60 = 13.889 MPa.
    const tow = { fibreClass: 'carbon', arealWeightGPerM2: 300, weave: 'hoop_tow' as const, plies: 2, layupDiameterMm: 60 }
    expect(layupBurstEstimate(tow).burstPressureBar).toBeCloseTo(138.889, 3)
    // The same as the general estimate given the class's figures by hand.
    const byHand = laminateBurstEstimate({ ...tow, fibreStrengthMPa: 2500, fibreDensityGPerCm3: 1.8, fibreVolumeFraction: 0.45, processFactor: 0.4 })
    expect(layupBurstEstimate({ ...tow, fibreVolumeFraction: 0.45, processFactor: 0.4 }).burstPressureBar).toBeCloseTo(byHand.burstPressureBar, 12)
  })

  it.each([
    ['a hybrid', { fibreClass: 'hybrid' }, /hybrid .* no single fibre strength/],
    ['an unknown fibre', { fibreClass: 'basalt' }, /Unknown fibre class/],
    ['a Vf of 1', { fibreVolumeFraction: 1 }, /between 0 and 1/],
    ['no plies', { plies: 0 }, /plies/],
  ])('refuses %s', (_label, change, message) => {
    const base = { fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90' as const, plies: 3, layupDiameterMm: 100 }
    expect(() => layupBurstEstimate({ ...base, ...change })).toThrow(VesselArithmeticError)
    expect(() => layupBurstEstimate({ ...base, ...change })).toThrow(message)
  })
})

describe('layup families: fibre class + areal weight + weave + resin (resin trimmed, case-insensitive)', () => {
  const glass = { fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90' as const, resin: 'Laminating Epoxy' }

  it('one key for the same layup whatever the resin\'s case or surrounding spaces', () => {
    expect(layupFamilyKey(glass)).toBe('e_glass:300:woven_0_90:laminating epoxy')
    expect(layupFamilyKey({ ...glass, resin: '  LAMINATING   epoxy ' })).toBe(layupFamilyKey(glass))
    expect(resinKey(' Époxy  B ')).toBe('époxy b')
  })

  it.each([
    ['another fibre', { fibreClass: 's_glass' }],
    ['another areal weight', { arealWeightGPerM2: 200 }],
    ['another weave', { weave: 'hoop_tow' as const }],
    ['another resin', { resin: 'Vinyl ester' }],
  ])('%s is another family', (_label, change) => {
    expect(layupFamilyKey({ ...glass, ...change })).not.toBe(layupFamilyKey(glass))
  })

  it('reads a key back, a resin with a colon included', () => {
    expect(parseLayupFamilyKey('carbon:200:woven_0_90:Epoxy: slow')).toEqual({ fibreClass: 'carbon', arealWeightGPerM2: 200, weave: 'woven_0_90', resinKey: 'epoxy: slow' })
    expect(parseLayupFamilyKey(layupFamilyKey(glass))).toEqual({ fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', resinKey: 'laminating epoxy' })
  })

  it.each([['no weave', 'carbon:200'], ['a bad weight', 'carbon:heavy:woven_0_90:epoxy'], ['an unknown weave', 'carbon:200:twill:epoxy'], ['no resin', 'carbon:200:woven_0_90: ']])('refuses a key with %s', (_label, key) => {
    expect(parseLayupFamilyKey(key)).toBeNull()
  })

  it('refuses an unnamed resin', () => {
    expect(() => layupFamilyKey({ ...glass, resin: '   ' })).toThrow(VesselArithmeticError)
  })
})
