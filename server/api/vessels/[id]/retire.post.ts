import { IdParamSchema } from '#shared/schemas/common'
import { VesselReasonSchema } from '#shared/schemas/proof'
import { retireVessel } from '../../../services/vessels'

/** The owner or the safety officer retires a vessel for good, with a reason. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, VesselReasonSchema)
  return retireVessel({ actor, readAll: actorCan(actor, 'vessels.read_all'), quarantine: actorCan(actor, 'vessels.quarantine') }, id, input.reason)
})
