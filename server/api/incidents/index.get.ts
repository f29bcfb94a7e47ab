import { IncidentListQuerySchema } from '#shared/schemas/incidents'
import { listIncidents } from '../../services/incidents'

/** The incidents the caller may see, newest first, server-paged: officers all, anyone else their own reports. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return listIncidents(actor, validQuery(event, IncidentListQuerySchema))
})
