import { BookingSchema } from '#shared/schemas/bookings'
import { createBooking } from '../../services/bookings'

/**
 * A member books a station (times on the club's wall clock). 201 with the booking and its cure hold;
 * 422 with every reason it is refused; 409 with the slot it collides with.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const input = await validBody(event, BookingSchema)
  const made = await createBooking(actor, input)
  setResponseStatus(event, 201)
  return made
})
