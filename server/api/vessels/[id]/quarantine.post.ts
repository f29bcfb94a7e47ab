import { IdParamSchema } from '#shared/schemas/common'
import { VesselReasonSchema } from '#shared/schemas/proof'
import { quarantineVessel } from '../../../services/vessels'

/** The safety officer quarantines a vessel, with a reason; failed and retired vessels stay as they are. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'vessels.quarantine')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, VesselReasonSchema)
  return quarantineVessel({ actor, readAll: actorCan(actor, 'vessels.read_all'), quarantine: actorCan(actor, 'vessels.quarantine') }, id, input.reason)
})
