import { z } from 'zod'
import { PageQuerySchema, isoDate, optionalText } from './common'
import { FIBRE_CLASSES, parseLayupFamilyKey, type LayupFamily } from '../utils/vessel-arithmetic'
import { PRESSURE_ENTRY_UNITS } from '../utils/units'
import { COUPON_FAILURE_MODES } from '../utils/coupon-failure-modes'

const positiveUpTo = (max: number, what: string) =>
  z.number({ invalid_type_error: `${what} must be a number` }).finite().positive(`${what} must be more than 0`).max(max, `${what} is at most ${max}`)

/**
 * A coupon test as a member records it: the layup (a single fibre class: a hybrid has no single
 * strength to estimate from), the tube it was laid on, the burst pressure in any unit (stored in bar)
 * and how it failed. The fibre volume fraction is optional: 0.35, common for a hand layup, when not measured.
 */
export const CouponTestSchema = z.object({
  testedOn: isoDate,
  fibreClass: z.enum(FIBRE_CLASSES, { errorMap: () => ({ message: 'Choose E-glass, S-glass, carbon or aramid (a hybrid has no single fibre strength: burst a coupon of each fibre)' }) }),
  arealWeightGPerM2: positiveUpTo(5000, 'The areal weight (g/m²)'),
  weave: z.enum(['woven_0_90', 'hoop_tow'], { errorMap: () => ({ message: 'Choose woven 0/90 cloth or hoop-wound tow' }) }),
  plies: z.number({ invalid_type_error: 'Plies must be a number' }).int('Plies are a whole number').min(1, 'At least 1 ply').max(50, 'At most 50 plies'),
  resin: z.string().trim().min(1, 'Name the resin').max(80, 'At most 80 characters')
    .refine(v => !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v), 'Use one line of visible characters'),
  tubeDiameterMm: positiveUpTo(1000, 'The tube diameter (mm)'),
  fibreVolumeFraction: z.number({ invalid_type_error: 'The fibre volume fraction must be a number' }).finite()
    .min(0.1, 'A fibre volume fraction below 0.1 is not a laminate').max(0.8, 'A fibre volume fraction above 0.8 is not a hand layup').nullable().optional(),
  burstPressure: positiveUpTo(30_000, 'The burst pressure'),
  pressureUnit: z.enum(PRESSURE_ENTRY_UNITS, { errorMap: () => ({ message: 'Use bar, psi, kPa or MPa' }) }),
  failureMode: z.enum(COUPON_FAILURE_MODES, { errorMap: () => ({ message: 'Choose how the coupon failed' }) }),
  notes: optionalText(2000),
  photoId: z.string().uuid('Not a valid photo id').transform(id => id.toLowerCase()).nullable().optional(),
})
export type CouponTestInput = z.infer<typeof CouponTestSchema>

/** A layup family in a query, as its key (`carbon:200:woven_0_90:laminating epoxy`). */
export const layupFamilyParam = z.string().trim().max(200, 'At most 200 characters')
  .transform((key, ctx): LayupFamily => {
    const family = parseLayupFamilyKey(key)
    if (!family) {
      ctx.addIssue({ code: 'custom', message: 'Not a layup family' })
      return z.NEVER
    }
    return family
  })

/** The club's coupon tests, newest first, server-paged; optionally one family's. */
export const CouponListQuerySchema = PageQuerySchema.extend({
  family: layupFamilyParam.optional(),
})
export type CouponListQuery = z.infer<typeof CouponListQuerySchema>
