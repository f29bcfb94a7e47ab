import { IdParamSchema } from '#shared/schemas/common'
import { FillStationSchema } from '#shared/schemas/events'
import { updateFillStation } from '../../services/events'

/** An officer with events.manage changes a fill station of their club (404 for another club's). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  const input = await validBody(event, FillStationSchema)
  const { id } = validParams(event, IdParamSchema)
  return updateFillStation(actor, id, input)
})
