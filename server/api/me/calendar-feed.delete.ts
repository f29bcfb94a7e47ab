import { revokeCalendarFeed } from '../../services/bookings'

/** Revokes the member's private calendar link: calendar programs get 404 from then on. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return revokeCalendarFeed(actor)
})
