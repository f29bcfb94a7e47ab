import { LaunchEventListQuerySchema } from '#shared/schemas/events'
import { listLaunchEvents } from '../../services/events'

/** The club's launch events, upcoming or past, server-paged: every member. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const query = validQuery(event, LaunchEventListQuerySchema)
  return listLaunchEvents(actor, query)
})
