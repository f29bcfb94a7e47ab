import { describe, expect, it } from 'vitest'
import {
  BURST_ESTIMATE_NOTE, FIBRE_PROPERTIES, VesselArithmeticError, WEAVE_FACTORS, curedPlyThicknessMm, fibreVolumeFraction,
  laminateBurstEstimate, plyFromTotalArealWeight, resinToMix, ruleOfMixturesModulusGPa,
} from '../../../shared/utils/vessel-arithmetic'

/** |actual − expected| ≤ relative × |expected|. */
function expectWithin(actual: number, expected: number, relative: number) {
  expect(Math.abs(actual - expected), `${actual} is not within ${relative * 100} % of ${expected}`).toBeLessThanOrEqual(Math.abs(expected) * relative)
}

// The laminate check values hold to ±0.1 %.
const LAMINATE_TOLERANCE = 0.001

describe('fibre classes (a National Research Council fibre-property table; two textbook tables agree)', () => {
  it('E-glass: 72.4 GPa, 3.45 GPa, 2.54 g/cm³', () => {
    expect(FIBRE_PROPERTIES.e_glass).toMatchObject({ modulusGPa: 72.4, strengthMPa: 3450, densityGPerCm3: 2.54 })
  })
  it.each([
    ['s_glass', [85.5, 86.9], 4590, [2.48, 2.49]],
    ['carbon', [230, 240], [2500, 3650], [1.76, 1.80]],
    ['aramid', [124, 131], 3600, [1.44, 1.47]],
  ] as const)('%s lies within the table\'s ranges', (fibre, modulus, strength, density) => {
    const p = FIBRE_PROPERTIES[fibre]
    const within = (v: number, range: number | readonly [number, number]) => (typeof range === 'number' ? v === range : v >= range[0] && v <= range[1])
    expect(within(p.modulusGPa, modulus)).toBe(true)
    expect(within(p.strengthMPa, strength)).toBe(true)
    expect(within(p.densityGPerCm3, density)).toBe(true)
  })
})

describe('cured ply thickness t = FAW / (ρf·Vf) and fibre volume fraction (composite-materials textbook formulas)', () => {
  it.each([
    ['carbon 200 g/m², ρf 1.78, Vf 0.40', 200, 1.78, 0.40, 0.2809],
    ['carbon 200 g/m², ρf 1.78, Vf 0.50', 200, 1.78, 0.50, 0.2247],
    ['glass 300 g/m², ρf 2.55, Vf 0.35', 300, 2.55, 0.35, 0.3361],
  ])('%s → %d mm (t = FAW/(ρf·Vf), ±0.1 %)', (_label, arealWeightGPerM2, fibreDensityGPerCm3, vf, expectedMm) => {
    expectWithin(curedPlyThicknessMm({ arealWeightGPerM2, fibreDensityGPerCm3, fibreVolumeFraction: vf }), expectedMm, LAMINATE_TOLERANCE)
  })

  it.each([
    ['E-glass ρf 2.54', 2.54, 0.3209],
    ['glass ρf 2.55', 2.55, 0.3200],
  ])('Wf 0.50 %s in resin of 1.20 → Vf %d (Vf = (Wf/ρf)/[Wf/ρf + (1−Wf)/ρm], ±0.1 %)', (_label, fibreDensityGPerCm3, expected) => {
    expectWithin(fibreVolumeFraction({ fibreMassFraction: 0.5, fibreDensityGPerCm3, resinDensityGPerCm3: 1.2 }), expected, LAMINATE_TOLERANCE)
  })

  it('a prepreg of 225 g/m² at Wf 0.6778, ρf 1.79, ρm 1.25 → fibre 85.20 µm + resin 58.00 µm = 143.2 µm, Vf 0.5950 (±0.1 %)', () => {
    const ply = plyFromTotalArealWeight({ totalArealWeightGPerM2: 225, fibreMassFraction: 0.6778, fibreDensityGPerCm3: 1.79, resinDensityGPerCm3: 1.25 })
    expectWithin(ply.fibreThicknessMm * 1000, 85.20, LAMINATE_TOLERANCE)
    expectWithin(ply.resinThicknessMm * 1000, 58.00, LAMINATE_TOLERANCE)
    expectWithin(ply.plyThicknessMm * 1000, 143.2, LAMINATE_TOLERANCE)
    expectWithin(ply.fibreVolumeFraction, 0.5950, LAMINATE_TOLERANCE)
    // The same thickness through t = FAW/(ρf·Vf) with the fibre's areal weight alone.
    expectWithin(curedPlyThicknessMm({ arealWeightGPerM2: 225 * 0.6778, fibreDensityGPerCm3: 1.79, fibreVolumeFraction: ply.fibreVolumeFraction }), 0.1432, LAMINATE_TOLERANCE)
  })

  it('UD carbon of 230 GPa at Vf 0.5 in a 3.5 GPa resin → 116.8 GPa (rule of mixtures E = Ef·Vf + Em·(1−Vf))', () => {
    expectWithin(ruleOfMixturesModulusGPa({ fibreModulusGPa: 230, matrixModulusGPa: 3.5, fibreVolumeFraction: 0.5 }), 116.8, LAMINATE_TOLERANCE)
  })

  it.each([
    ['Vf of 0', { arealWeightGPerM2: 200, fibreDensityGPerCm3: 1.78, fibreVolumeFraction: 0 }, /between 0 and 1/],
    ['Vf of 1', { arealWeightGPerM2: 200, fibreDensityGPerCm3: 1.78, fibreVolumeFraction: 1 }, /between 0 and 1/],
    ['a negative areal weight', { arealWeightGPerM2: -200, fibreDensityGPerCm3: 1.78, fibreVolumeFraction: 0.4 }, /more than 0/],
    ['an infinite density', { arealWeightGPerM2: 200, fibreDensityGPerCm3: Number.POSITIVE_INFINITY, fibreVolumeFraction: 0.4 }, /not infinity/],
  ])('refuses %s', (_label, input, message) => {
    expect(() => curedPlyThicknessMm(input)).toThrow(VesselArithmeticError)
    expect(() => curedPlyThicknessMm(input)).toThrow(message)
  })
})

describe('estimated laminate burst P = 2·t·σ_hoop/D, σ_hoop = σf·Vf·k_weave·k_process (Barlow over the rule of mixtures)', () => {
  // A check of the arithmetic, not of reality. k_weave 0.5 for balanced 0/90 woven cloth; k_process 0.5
  // for hand layup is from memory, not a published figure.
  it('3 plies of 300 g/m² E-glass woven cloth (σf 3 450 MPa, ρf 2.55) at Vf 0.35 on 100 mm → t 1.0084 mm, σ_hoop 301.9 MPa, P ≈ 60.9 bar', () => {
    const estimate = laminateBurstEstimate({
      plies: 3, arealWeightGPerM2: 300, fibreDensityGPerCm3: 2.55, fibreVolumeFraction: 0.35, fibreStrengthMPa: 3450,
      weave: 'woven_0_90', layupDiameterMm: 100,
    })
    expectWithin(estimate.laminateThicknessMm, 1.0084, LAMINATE_TOLERANCE)
    expectWithin(estimate.hoopStrengthMPa, 301.9, LAMINATE_TOLERANCE)
    expect(estimate.burstPressureBar).toBeCloseTo(60.9, 1)
    expect(estimate.estimate).toBe(true)
    expect(estimate.note).toBe(BURST_ESTIMATE_NOTE)
    expect(estimate.note).toMatch(/only a witnessed proof test rates a vessel/)
  })

  it('hoop-wound tow carries the full fibre strength (k_weave 1.0) and doubles the woven estimate; k_process defaults to 0.5 (from memory)', () => {
    expect(WEAVE_FACTORS).toEqual({ woven_0_90: 0.5, hoop_tow: 1.0 })
    const base = { plies: 3, arealWeightGPerM2: 300, fibreDensityGPerCm3: 2.55, fibreVolumeFraction: 0.35, fibreStrengthMPa: 3450, layupDiameterMm: 100 }
    const woven = laminateBurstEstimate({ ...base, weave: 'woven_0_90' })
    const tow = laminateBurstEstimate({ ...base, weave: 'hoop_tow' })
    expectWithin(tow.burstPressureMPa, 2 * woven.burstPressureMPa, 1e-12)
    expectWithin(laminateBurstEstimate({ ...base, weave: 'woven_0_90', processFactor: 0.5 }).burstPressureMPa, woven.burstPressureMPa, 1e-12)
    expectWithin(laminateBurstEstimate({ ...base, weave: 'woven_0_90', processFactor: 0.25 }).burstPressureMPa, woven.burstPressureMPa / 2, 1e-12)
  })

  it.each([
    ['no plies', { plies: 0 }, /plies/],
    ['half a ply', { plies: 1.5 }, /whole number/],
    ['a process factor above 1', { processFactor: 1.2 }, /cannot exceed 1/],
    ['a zero diameter', { layupDiameterMm: 0 }, /more than 0/],
    ['an unknown weave', { weave: 'twill' }, /woven_0_90 or hoop_tow/],
    ['a NaN strength', { fibreStrengthMPa: Number.NaN }, /must be a number/],
  ])('refuses %s', (_label, change, message) => {
    const base = { plies: 3, arealWeightGPerM2: 300, fibreDensityGPerCm3: 2.55, fibreVolumeFraction: 0.35, fibreStrengthMPa: 3450, weave: 'woven_0_90' as const, layupDiameterMm: 100 }
    expect(() => laminateBurstEstimate({ ...base, ...change } as Parameters<typeof laminateBurstEstimate>[0])).toThrow(message)
  })
})

describe('resin to mix for a hand layup (common practice: cloth takes its own weight in mixed resin, plus 15–20 % waste)', () => {
  it('4 plies of 200 g/m² over 0.5 m² → 400 g of cloth → 480 g mixed at 20 % waste (common practice)', () => {
    const mix = resinToMix({ clothAreaM2: 0.5, arealWeightGPerM2: 200, plies: 4, wasteFraction: 0.2, mixRatio: { basis: 'weight', resinParts: 100, hardenerParts: 30 } })
    expect(mix.clothMassG).toBeCloseTo(400, 9)
    expect(mix.mixedMassG).toBeCloseTo(480, 9)
    // By weight, 100:30 splits 480 g into 369.2 g of resin and 110.8 g of hardener.
    expect(mix.resinG).toBeCloseTo(480 * 100 / 130, 9)
    expect(mix.hardenerG).toBeCloseTo(480 * 30 / 130, 9)
    expect(mix).toMatchObject({ basis: 'weight', resinMl: null, hardenerMl: null })
  })

  it('a ratio by volume is measured by volume: 2:1 with resin 1.15 g/ml and hardener 0.95 g/ml (the maker states the ratio and densities)', () => {
    const mix = resinToMix({
      clothAreaM2: 0.5, arealWeightGPerM2: 200, plies: 4,
      mixRatio: { basis: 'volume', resinParts: 2, hardenerParts: 1, resinDensityGPerMl: 1.15, hardenerDensityGPerMl: 0.95 },
    })
    expect(mix.mixedMassG).toBeCloseTo(480, 9) // the default waste allowance is 20 % (common practice)
    expect(mix.resinMl! / mix.hardenerMl!).toBeCloseTo(2, 12)
    expect(mix.resinG + mix.hardenerG).toBeCloseTo(480, 9)
    expect(mix.resinMl).toBeCloseTo(2 * 480 / (2 * 1.15 + 0.95), 9)
    // Not the by-weight split: mixing the two up would change the hardener by about a fifth.
    expect(mix.hardenerG / mix.mixedMassG).not.toBeCloseTo(1 / 3, 2)
  })

  it.each([
    ['no cloth', { clothAreaM2: 0 }, /cloth area/],
    ['a waste of 100 %', { wasteFraction: 1 }, /fraction below 1/],
    ['a negative waste', { wasteFraction: -0.1 }, /cannot be negative/],
    ['a volume ratio without densities', { mixRatio: { basis: 'volume', resinParts: 2, hardenerParts: 1 } }, /density/],
    ['a zero hardener part', { mixRatio: { basis: 'weight', resinParts: 100, hardenerParts: 0 } }, /hardener parts/],
  ])('refuses %s', (_label, change, message) => {
    const base = { clothAreaM2: 0.5, arealWeightGPerM2: 200, plies: 4, mixRatio: { basis: 'weight' as const, resinParts: 100, hardenerParts: 30 } }
    expect(() => resinToMix({ ...base, ...change } as Parameters<typeof resinToMix>[0])).toThrow(message)
  })
})
