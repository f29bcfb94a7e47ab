import { calendarFeedStatus } from '../../services/bookings'

/** Whether the member has a private calendar link (the link itself is shown only when made). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return calendarFeedStatus(actor)
})
