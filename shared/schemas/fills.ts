import { z } from 'zod'
import { PRESSURE_ENTRY_UNITS } from '../utils/units'

/** A UUID field named `what` in its messages ("Choose the member"), lower-cased. */
export const uuidField = (what: string) => z.string({ required_error: `Choose ${what}`, invalid_type_error: `Choose ${what}` })
  .uuid(`Not a valid id for ${what}`).transform(id => id.toLowerCase())

/**
 * A fill as asked at the launch table (`POST /api/fills/check` and `POST /api/fills`): the member
 * (a membership id), their vessel, the gauge pressure in the unit entered (> 0; converted to bar at full
 * precision), the water in litres (≥ 0; the server also refuses water at or above the vessel's volume),
 * the fill station and the event; `supervised` when an instructor records it as the supervisor.
 */
export const FillRequestSchema = z.object({
  memberId: uuidField('the member'),
  vesselId: uuidField('the vessel'),
  pressure: z.number({ invalid_type_error: 'The pressure must be a number', required_error: 'Enter the pressure' })
    .finite('The pressure must be a number').positive('The pressure must be more than 0').max(5000, 'The pressure is at most 5000 in any unit'),
  unit: z.enum(PRESSURE_ENTRY_UNITS, { errorMap: () => ({ message: 'Use bar, psi, kPa or MPa' }) }),
  waterVolumeL: z.number({ invalid_type_error: 'The water volume must be a number', required_error: 'Enter the water volume (L)' })
    .finite('The water volume must be a number').min(0, 'The water volume is 0 L or more').max(100, 'The water volume is at most 100 L'),
  stationId: uuidField('the fill station'),
  eventId: uuidField('the event'),
  supervised: z.boolean({ invalid_type_error: 'Supervised is yes or no' }).optional().default(false),
}).strict()
export type FillRequest = z.infer<typeof FillRequestSchema>
