import { IdParamSchema } from '#shared/schemas/common'
import { IncidentReviewSchema } from '#shared/schemas/incidents'
import { reviewIncident } from '../../../services/incidents'

/** The safety officer (incidents.review) changes an open incident's notes, findings or actions. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'incidents.review')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, IncidentReviewSchema)
  return reviewIncident(actor, id, input)
})
