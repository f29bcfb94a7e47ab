import { IdParamSchema } from '#shared/schemas/common'
import { VesselReasonSchema } from '#shared/schemas/proof'
import { releaseVessel } from '../../../services/vessels'

/** The safety officer releases a quarantined vessel after review: it awaits a new proof test. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'vessels.quarantine')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, VesselReasonSchema)
  return releaseVessel({ actor, readAll: actorCan(actor, 'vessels.read_all'), quarantine: actorCan(actor, 'vessels.quarantine') }, id, input.reason)
})
