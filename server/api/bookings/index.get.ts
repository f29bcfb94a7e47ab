import { BookingWeekQuerySchema } from '#shared/schemas/bookings'
import { bookingWeek } from '../../services/bookings'

/** The week view: every station (or one) and its live bookings, Monday to Sunday in the club's zone. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const query = validQuery(event, BookingWeekQuerySchema)
  return bookingWeek(actor, query)
})
