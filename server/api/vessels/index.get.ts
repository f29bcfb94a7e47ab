import { VesselListQuerySchema } from '#shared/schemas/vessel'
import { listVessels } from '../../services/vessels'

/** Vessels, server-paged: a member's own, or the whole club's with vessels.read_all. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const query = validQuery(event, VesselListQuerySchema)
  return listVessels({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, query)
})
