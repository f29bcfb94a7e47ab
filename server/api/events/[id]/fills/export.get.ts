import { IdParamSchema } from '#shared/schemas/common'
import { FillLogQuerySchema } from '#shared/schemas/events'
import { EVENT_FILL_CSV_HEADER, eventFillLogRows } from '../../../../services/events'

/** Every fill and refused attempt of an event the filter selects, as a CSV download (members.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { id } = validParams(event, IdParamSchema)
  const rows = await eventFillLogRows(actor, id, validQuery(event, FillLogQuerySchema))
  return sendCsv(event, `event-${id.slice(0, 8)}-fills.csv`, EVENT_FILL_CSV_HEADER, rows)
})
