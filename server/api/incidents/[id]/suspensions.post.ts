import { IdParamSchema } from '#shared/schemas/common'
import { IncidentSuspensionSchema } from '#shared/schemas/incidents'
import { suspendTierFromIncident } from '../../../services/incidents'

/** The safety officer (incidents.review) suspends a tier of a person involved in an open incident; answers that member's tiers. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'incidents.review')
  await requirePermission(event, 'tiers.suspend')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, IncidentSuspensionSchema)
  return suspendTierFromIncident(actor, id, input)
})
