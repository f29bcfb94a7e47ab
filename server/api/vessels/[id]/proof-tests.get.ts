import { IdParamSchema } from '#shared/schemas/common'
import { vesselHistory } from '../../../services/vessels'

/** A vessel's proof tests and event log, for its owner or a holder of vessels.read_all; 404 otherwise. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const history = await vesselHistory({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, id)
  if (!history) notFound('No such vessel')
  return history
})
