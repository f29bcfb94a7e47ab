import { IdParamSchema } from '#shared/schemas/common'
import { vesselLabel } from '../../../services/vessels'

/** What a vessel's printable label shows, with its QR code (SVG) for the vessel's page; 404 like the vessel itself. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const label = await vesselLabel({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, id)
  if (!label) notFound('No such vessel')
  return label
})
