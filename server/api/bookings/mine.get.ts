import { myBookings } from '../../services/bookings'

/** The member's own bookings: all to come and those of the last 30 days. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return myBookings(actor)
})
