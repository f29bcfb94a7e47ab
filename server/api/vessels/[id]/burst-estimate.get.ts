import { IdParamSchema } from '#shared/schemas/common'
import type { BurstEstimateDto } from '#shared/types/coupons'
import { vesselBurstEstimate } from '../../../services/vessels'

/** A vessel's burst estimate, raw and calibrated by its family's coupons; 404 for a vessel the member may not see. */
export default defineEventHandler(async (event): Promise<BurstEstimateDto> => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const estimate = await vesselBurstEstimate({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, id)
  if (!estimate) notFound('No such vessel')
  return estimate
})
