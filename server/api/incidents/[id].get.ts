import { IdParamSchema } from '#shared/schemas/common'
import { incidentOr404 } from '../../services/incidents'

/** One incident for its reporter or an officer (404 for anyone else); an injury's personal details for the safety officer only. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return incidentOr404(actor, id)
})
