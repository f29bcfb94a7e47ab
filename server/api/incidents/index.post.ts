import { IncidentReportSchema } from '#shared/schemas/incidents'
import { reportIncident } from '../../services/incidents'

/** Any signed-in member reports an incident; a vessel it names is quarantined in the same transaction. 201 with the report. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const input = await validBody(event, IncidentReportSchema)
  const incident = await reportIncident(actor, input)
  setResponseStatus(event, 201)
  return incident
})
