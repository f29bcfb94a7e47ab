import { MyFillsQuerySchema } from '#shared/schemas/events'
import { myFills } from '../../services/events'

/** The signed-in member's own fills and refused attempts, newest first, server-paged. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const query = validQuery(event, MyFillsQuerySchema)
  return myFills(actor, query)
})
