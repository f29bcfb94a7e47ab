import { CouponTest } from '../../models'
import { addCalendarDays } from '#shared/utils/dates'
import { DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION, resinKey, type FibreClass, type Weave } from '#shared/utils/vessel-arithmetic'
import type { CouponFailureMode } from '#shared/utils/coupon-failure-modes'
import type { SeedContext } from './context'

interface DemoCoupon {
  tester: string
  daysAgo: number
  fibreClass: FibreClass
  arealWeightGPerM2: number
  weave: Weave
  plies: number
  resin: string
  tubeDiameterMm: number
  fibreVolumeFraction?: number
  burstPressureBar: number
  failureMode: CouponFailureMode
  /** Unique among the demo coupons: the seed finds each one by it. */
  notes: string
}

const GLASS = { fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', resin: 'Laminating epoxy' } as const
const CARBON_CLOTH = { fibreClass: 'carbon', arealWeightGPerM2: 200, weave: 'woven_0_90', resin: 'Laminating epoxy' } as const
// 12k carbon tow wound round the hoop, about 300 g/m² a layer.
const CARBON_TOW = { fibreClass: 'carbon', arealWeightGPerM2: 300, weave: 'hoop_tow', resin: 'Laminating epoxy' } as const

// Invented bursts, plausible for a club's bench: a dozen coupons over three families. The first two
// families are the layups of the demo vessels Petrel (E-glass cloth) and Longshore (carbon cloth).
const DEMO_COUPONS: DemoCoupon[] = [
  { tester: 'member@hoopwise.example', daysAgo: 120, ...GLASS, plies: 3, tubeDiameterMm: 104, burstPressureBar: 52.5, failureMode: 'hoop_rupture', notes: 'Glass coupon G1: clean hoop break mid-tube.' },
  { tester: 'member@hoopwise.example', daysAgo: 118, ...GLASS, plies: 3, tubeDiameterMm: 104, burstPressureBar: 61.0, failureMode: 'hoop_rupture', notes: 'Glass coupon G2: hoop break near the middle, some whitening first.' },
  { tester: 'instructor@hoopwise.example', daysAgo: 90, ...GLASS, plies: 3, tubeDiameterMm: 104, burstPressureBar: 44.0, failureMode: 'end_fitting', notes: 'Glass coupon G3: the end plug bond let go first.' },
  { tester: 'instructor@hoopwise.example', daysAgo: 88, ...GLASS, plies: 4, tubeDiameterMm: 104, burstPressureBar: 74.5, failureMode: 'hoop_rupture', notes: 'Glass coupon G4: four plies, hoop rupture.' },
  { tester: 'safety@hoopwise.example', daysAgo: 60, ...GLASS, plies: 3, tubeDiameterMm: 104, fibreVolumeFraction: 0.38, burstPressureBar: 57.5, failureMode: 'leak_before_burst', notes: 'Glass coupon G5: wept at 50 bar, held to 57.5 bar.' },
  { tester: 'instructor@hoopwise.example', daysAgo: 75, ...CARBON_CLOTH, plies: 4, tubeDiameterMm: 90, burstPressureBar: 66.0, failureMode: 'hoop_rupture', notes: 'Carbon cloth coupon C1: hoop rupture.' },
  { tester: 'instructor@hoopwise.example', daysAgo: 74, ...CARBON_CLOTH, plies: 4, tubeDiameterMm: 90, burstPressureBar: 58.5, failureMode: 'hoop_rupture', notes: 'Carbon cloth coupon C2: hoop rupture at a ply drop.' },
  { tester: 'safety@hoopwise.example', daysAgo: 45, ...CARBON_CLOTH, plies: 3, tubeDiameterMm: 90, burstPressureBar: 41.0, failureMode: 'axial_split', notes: 'Carbon cloth coupon C3: split along the overlap seam.' },
  { tester: 'member@hoopwise.example', daysAgo: 30, ...CARBON_CLOTH, plies: 4, tubeDiameterMm: 90, burstPressureBar: 63.5, failureMode: 'hoop_rupture', notes: 'Carbon cloth coupon C4: hoop rupture.' },
  { tester: 'safety@hoopwise.example', daysAgo: 40, ...CARBON_TOW, plies: 2, tubeDiameterMm: 60, fibreVolumeFraction: 0.45, burstPressureBar: 151.0, failureMode: 'hoop_rupture', notes: 'Tow coupon T1: wound at tension, hoop rupture.' },
  { tester: 'safety@hoopwise.example', daysAgo: 39, ...CARBON_TOW, plies: 2, tubeDiameterMm: 60, fibreVolumeFraction: 0.45, burstPressureBar: 128.0, failureMode: 'end_fitting', notes: 'Tow coupon T2: the end fitting pulled out first.' },
  { tester: 'instructor@hoopwise.example', daysAgo: 20, ...CARBON_TOW, plies: 3, tubeDiameterMm: 60, fibreVolumeFraction: 0.45, burstPressureBar: 212.0, failureMode: 'hoop_rupture', notes: 'Tow coupon T3: three layers, hoop rupture.' },
]

/**
 * A dozen demo coupon tests over three layup families (E-glass cloth, carbon cloth, carbon hoop tow,
 * all in one epoxy), so the coupons page shows calibration factors and the demo vessels calibrated
 * estimates. Found by their notes, so a second run adds nothing.
 */
export async function seedCouponTests(ctx: SeedContext): Promise<void> {
  const { transaction, clubId } = ctx
  if (!clubId) throw new Error('seedClub must run before seedCouponTests')
  for (const { tester, daysAgo, ...c } of DEMO_COUPONS) {
    const testedByMembershipId = ctx.memberIds.get(tester)
    if (!testedByMembershipId) throw new Error(`seedMembers must run before seedCouponTests (${tester})`)
    if (await CouponTest.findOne({ where: { clubId, notes: c.notes }, transaction })) continue
    await CouponTest.create({
      ...c,
      clubId,
      testedByMembershipId,
      testedOn: addCalendarDays(ctx.today, -daysAgo),
      resinKey: resinKey(c.resin),
      fibreVolumeFraction: c.fibreVolumeFraction ?? DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION,
    }, { transaction })
  }
}
