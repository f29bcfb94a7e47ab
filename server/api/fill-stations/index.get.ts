import { FillStationListQuerySchema } from '#shared/schemas/events'
import { listFillStations } from '../../services/events'

/** The club's fill stations with both pressures and their gauges: staff and officers (members.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const query = validQuery(event, FillStationListQuerySchema)
  return listFillStations(actor, query.retired === 'include')
})
