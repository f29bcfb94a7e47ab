import { IdParamSchema } from '#shared/schemas/common'
import { FillStationRetireSchema } from '#shared/schemas/events'
import { retireFillStation } from '../../../services/events'

/** An officer with events.manage retires a fill station, giving the reason (audited). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  const { reason } = await validBody(event, FillStationRetireSchema)
  const { id } = validParams(event, IdParamSchema)
  return retireFillStation(actor, id, reason)
})
