import { IdParamSchema } from '#shared/schemas/common'
import { FillLogQuerySchema } from '#shared/schemas/events'
import { eventFillLog } from '../../../../services/events'

/** An event's fills and refused attempts, sorted and paged by the server: staff and officers (members.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { id } = validParams(event, IdParamSchema)
  const query = validQuery(event, FillLogQuerySchema)
  return eventFillLog(actor, id, query)
})
