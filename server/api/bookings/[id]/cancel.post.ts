import { IdParamSchema } from '#shared/schemas/common'
import { BookingCancelSchema } from '#shared/schemas/bookings'
import { cancelBooking } from '../../../services/bookings'

/** Cancels a booking: the member's own until it starts; any, with a reason, for bookings.cancel_any. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { reason } = await validBody(event, BookingCancelSchema)
  const { id } = validParams(event, IdParamSchema)
  return cancelBooking(actor, id, reason)
})
