import { IdParamSchema } from '#shared/schemas/common'
import { StationSchema } from '#shared/schemas/bookings'
import { updateStation } from '../../services/bookings'

/** An officer with stations.manage changes a station of their club (404 for another club's). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'stations.manage')
  const input = await validBody(event, StationSchema)
  const { id } = validParams(event, IdParamSchema)
  return updateStation(actor, id, input)
})
