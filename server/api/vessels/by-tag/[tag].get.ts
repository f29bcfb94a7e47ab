import { VesselTagParamSchema } from '#shared/schemas/vessel'
import { getVesselByTag } from '../../../services/vessels'

/** One vessel by its tag, as pages address it: its owner's, or anyone's with vessels.read_all; else 404. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { tag } = validParams(event, VesselTagParamSchema)
  const vessel = await getVesselByTag({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, tag)
  if (!vessel) notFound('No such vessel')
  return vessel
})
