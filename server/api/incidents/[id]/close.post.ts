import { IdParamSchema } from '#shared/schemas/common'
import { IncidentCloseSchema } from '#shared/schemas/incidents'
import { closeIncident } from '../../../services/incidents'

/** The safety officer (incidents.review) closes an open incident with its outcome; the vessel stays quarantined. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'incidents.review')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, IncidentCloseSchema)
  return closeIncident(actor, id, input)
})
