import { FillStationSchema } from '#shared/schemas/events'
import { createFillStation } from '../../services/events'

/** An officer with events.manage adds a fill station. 201 with it. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  const input = await validBody(event, FillStationSchema)
  const station = await createFillStation(actor, input)
  setResponseStatus(event, 201)
  return station
})
