import { IdParamSchema } from '#shared/schemas/common'
import { getVessel } from '../../services/vessels'

/** One vessel: its owner's, or anyone's with vessels.read_all; 404 for another member's or a missing one. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const vessel = await getVessel({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, id)
  if (!vessel) notFound('No such vessel')
  return vessel
})
