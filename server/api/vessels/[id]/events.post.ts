import { IdParamSchema } from '#shared/schemas/common'
import { VesselEventReportSchema } from '#shared/schemas/proof'
import { reportVesselEvent } from '../../../services/vessels'

/** The owner, or an officer with vessels.read_all, reports a repair, modification, damage, crash or heat exposure: the proof ends at once. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, VesselEventReportSchema)
  return reportVesselEvent({ actor, readAll: actorCan(actor, 'vessels.read_all'), quarantine: actorCan(actor, 'vessels.quarantine') }, id, input)
})
