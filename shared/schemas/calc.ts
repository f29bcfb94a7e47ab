import { z } from 'zod'
import { DISTANCE_RULES } from '../utils/vessel-arithmetic'
import { PRESSURE_ENTRY_UNITS } from '../utils/units'

/**
 * A number from the query string: written out (an empty or missing value is not 0), finite. Whether
 * the number makes physical sense is the arithmetic's question.
 */
const queryNumber = (label: string) => {
  const Label = label[0]!.toUpperCase() + label.slice(1)
  return z
    .string({ required_error: `Enter ${label}`, invalid_type_error: `Give ${label} once, as a number` })
    .trim()
    .min(1, `Enter ${label}`)
    .max(32, `${Label} is too long`)
    .transform(Number)
    .refine(Number.isFinite, `${Label} must be a finite number`)
}

/** `GET /api/calc/air-charge`: gauge pressure with its unit, vessel and water volumes in litres, the distance rule. */
export const AirChargeQuerySchema = z.object({
  pressure: queryNumber('the gauge pressure'),
  unit: z.enum(PRESSURE_ENTRY_UNITS, { errorMap: () => ({ message: 'Use bar, psi, kPa or MPa' }) }),
  vesselVolumeL: queryNumber('the vessel volume in litres'),
  waterVolumeL: queryNumber('the water volume in litres').default('0'),
  distanceRule: z.enum(DISTANCE_RULES, { errorMap: () => ({ message: 'Use tnt or 2tnt' }) }).optional(),
})
export type AirChargeQuery = z.infer<typeof AirChargeQuerySchema>
