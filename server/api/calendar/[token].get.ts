import { CalendarFeedTokenParamSchema } from '#shared/schemas/bookings'
import { calendarFeed } from '../../services/bookings'

/**
 * The iCalendar feed of one member's bookings, for calendar programs: no session, only the private
 * link's token. 404 for an unknown or revoked token (the two are never told apart).
 */
export default defineEventHandler(async (event) => {
  const { token } = validParams(event, CalendarFeedTokenParamSchema)
  const body = await calendarFeed(token)
  if (body === null) notFound('No such calendar')
  setResponseHeaders(event, { 'content-type': 'text/calendar; charset=utf-8', 'cache-control': 'private, max-age=300' })
  return body
})
