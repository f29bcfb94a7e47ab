import { StationSchema } from '#shared/schemas/bookings'
import { createStation } from '../../services/bookings'

/** An officer with stations.manage adds a station. 201 with it. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'stations.manage')
  const input = await validBody(event, StationSchema)
  const station = await createStation(actor, input)
  setResponseStatus(event, 201)
  return station
})
