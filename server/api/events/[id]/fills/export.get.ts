import { IdParamSchema } from '#shared/schemas/common'
import { FillLogQuerySchema } from '#shared/schemas/events'
import { eventFillLogCsv } from '../../../../services/events'

/** Every fill and refused attempt of an event the filter selects, as a CSV download (members.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { id } = validParams(event, IdParamSchema)
  const query = validQuery(event, FillLogQuerySchema)
  const csv = await eventFillLogCsv(actor, id, query)
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="event-${id.slice(0, 8)}-fills.csv"`)
  return csv
})
