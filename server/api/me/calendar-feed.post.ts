import { CalendarFeedRenewSchema } from '#shared/schemas/bookings'
import { renewCalendarFeed } from '../../services/bookings'

/** Makes a new private calendar link (the old one stops working); the answer holds it this once. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  await validBody(event, CalendarFeedRenewSchema)
  setResponseHeader(event, 'cache-control', 'no-store')
  return renewCalendarFeed(actor)
})
