import { describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import type { AirChargeDto } from '../../../shared/types/calc'

/** |actual − expected| ≤ relative × |expected|. */
function expectWithin(actual: number, expected: number, relative: number) {
  expect(Math.abs(actual - expected), `${actual} is not within ${relative * 100} % of ${expected}`).toBeLessThanOrEqual(Math.abs(expected) * relative)
}

// ASME PCC-2's worked values hold to ±0.2 % (101 325 Pa or the exponent 0.2857 move case 1 by 1–2 J).
const PCC2_TOLERANCE = 0.002

const KEYS = ['airVolumeL', 'absolutePressurePa', 'storedEnergyJ', 'tntEquivalentKg', 'minimumDistanceM', 'distanceRule'].sort()

describe('GET /api/calc/air-charge (public)', () => {
  // ASME PCC-2 (2008) Part 5 Art. 5.1, Mandatory App. II: E = 2.5·Pat·V·[1 − (Pa/Pat)^0.286] with
  // Pa = 101 000 Pa, TNT = E / 4 266 920; Mandatory App. III: the greater of 30 m (E ≤ 135.5 MJ) and
  // 20·TNT^⅓ (2008) or 20·(2·TNT)^⅓ (later edition).
  it.each([
    ['10 bar on 3 L with 1 L of water (2.0 L of air)', { pressure: 10, unit: 'bar', vesselVolumeL: 3, waterVolumeL: 1 }, 2, 1_101_000, 2725, 6.386e-4],
    ['20 bar on 1.5 L of air, no water', { pressure: 20, unit: 'bar', vesselVolumeL: 1.5 }, 1.5, 2_101_000, 4571, 1.071e-3],
    ['90 psi on a 2 L bottle a third full of water', { pressure: 90, unit: 'psi', vesselVolumeL: 2, waterVolumeL: 2 / 3 }, 4 / 3, 721_528, 1035, 2.424e-4],
    ['1 000 kPa on 2.0 L of air', { pressure: 1000, unit: 'kPa', vesselVolumeL: 2 }, 2, 1_101_000, 2725, 6.386e-4],
    ['1 MPa on 2.0 L of air', { pressure: 1, unit: 'MPa', vesselVolumeL: 2.5, waterVolumeL: 0.5 }, 2, 1_101_000, 2725, 6.386e-4],
  ])('answers %s without sign-in, as ASME PCC-2 (2008) Mandatory App. II and III work it', async (_label, query, airL, patPa, energyJ, tntKg) => {
    const res = await api<AirChargeDto>('/api/calc/air-charge', { query })
    expect(res.status).toBe(200)
    expect(Object.keys(res.body).sort()).toEqual(KEYS)
    expectWithin(res.body.airVolumeL, airL, 1e-9) // the vessel volume minus the water
    expectWithin(res.body.absolutePressurePa, patPa, PCC2_TOLERANCE) // gauge + the code's 101 000 Pa (App. II)
    expectWithin(res.body.storedEnergyJ, energyJ, PCC2_TOLERANCE) // ASME PCC-2 App. II
    expectWithin(res.body.tntEquivalentKg, tntKg, PCC2_TOLERANCE) // ASME PCC-2 App. II, E / 4 266 920
    expect(res.body.minimumDistanceM).toBe(30) // ASME PCC-2 App. III (a): 30 m while E ≤ 135.5 MJ
    expect(res.body.distanceRule).toBe('tnt') // the default: the 2008 edition's TNT^⅓ form
  })

  it('takes the later edition\'s 2·TNT form when asked, and a signed-in member gets the same answer (ASME PCC-2 501-III)', async () => {
    const query = { pressure: 10, unit: 'bar', vesselVolumeL: 3, waterVolumeL: 1, distanceRule: '2tnt' }
    const anon = await api<AirChargeDto>('/api/calc/air-charge', { query })
    expect(anon.status).toBe(200)
    expect(anon.body.distanceRule).toBe('2tnt')
    expect(anon.body.minimumDistanceM).toBe(30) // 20·(2·TNT)^⅓ = 2.170 m, under the 30 m floor
    const member = await api<AirChargeDto>('/api/calc/air-charge', { query: { ...query, distanceRule: undefined }, as: 'member' })
    expect(member.status).toBe(200)
    expect(member.body.distanceRule).toBe('tnt')
    expectWithin(member.body.storedEnergyJ, 2725, PCC2_TOLERANCE)
  })

  it('lets the scaled distance pass the floor once TNT exceeds 3.375 kg (E > 14.40 MJ) (ASME PCC-2 App. III)', async () => {
    // 300 bar on 300 L of air stores about 18 MJ: TNT ≈ 4.3 kg → 20·TNT^⅓ ≈ 32 m, over the 30 m floor.
    const res = await api<AirChargeDto>('/api/calc/air-charge', { query: { pressure: 300, unit: 'bar', vesselVolumeL: 300 } })
    expect(res.status).toBe(200)
    expect(res.body.tntEquivalentKg).toBeGreaterThan(3.375)
    expectWithin(res.body.minimumDistanceM, 20 * Math.cbrt(res.body.tntEquivalentKg), 1e-9)
    expect(res.body.minimumDistanceM).toBeGreaterThan(30)
  })

  it.each([
    ['no query at all', {}, /gauge pressure/i],
    ['no unit', { pressure: 10, vesselVolumeL: 3 }, /bar, psi, kPa or MPa/],
    ['an unknown unit', { pressure: 10, unit: 'atm', vesselVolumeL: 3 }, /bar, psi, kPa or MPa/],
    ['an empty pressure', { pressure: '', unit: 'bar', vesselVolumeL: 3 }, /Enter the gauge pressure/],
    ['a pressure that is not a number', { pressure: 'ten', unit: 'bar', vesselVolumeL: 3 }, /finite number/],
    ['an infinite pressure', { pressure: 'Infinity', unit: 'bar', vesselVolumeL: 3 }, /finite number/],
    ['NaN for the vessel', { pressure: 10, unit: 'bar', vesselVolumeL: 'NaN' }, /finite number/],
    ['a zero vessel volume', { pressure: 10, unit: 'bar', vesselVolumeL: 0 }, /vessel volume.*more than 0/],
    ['a negative vessel volume', { pressure: 10, unit: 'bar', vesselVolumeL: -3 }, /vessel volume.*more than 0/],
    ['water filling the whole vessel', { pressure: 10, unit: 'bar', vesselVolumeL: 3, waterVolumeL: 3 }, /less than the vessel volume/],
    ['more water than vessel', { pressure: 10, unit: 'bar', vesselVolumeL: 3, waterVolumeL: 5 }, /less than the vessel volume/],
    ['negative water', { pressure: 10, unit: 'bar', vesselVolumeL: 3, waterVolumeL: -1 }, /cannot be negative/],
    ['a pressure below a perfect vacuum', { pressure: -2, unit: 'bar', vesselVolumeL: 3 }, /below a perfect vacuum/],
    ['an unknown distance rule', { pressure: 10, unit: 'bar', vesselVolumeL: 3, distanceRule: 'tnt3' }, /tnt or 2tnt/],
  ])('answers 400 with a message for %s', async (_label, query, message) => {
    const res = await api('/api/calc/air-charge', { query: query as Record<string, string | number> })
    expect(res.status).toBe(400)
    expect(res.body.message).toMatch(message)
    expect(Object.keys(res.body.data?.fields ?? {}).length).toBeGreaterThan(0)
  })

  it('answers 400 when a number is given twice', async () => {
    const res = await api('/api/calc/air-charge?pressure=10&pressure=20&unit=bar&vesselVolumeL=3')
    expect(res.status).toBe(400)
    expect(res.body.message).toMatch(/once/)
  })
})
