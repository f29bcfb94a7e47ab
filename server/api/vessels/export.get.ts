import { VesselListQuerySchema } from '#shared/schemas/vessel'
import { vesselsExport } from '../../services/club-data'

/** The vessels list with its filters and sort as a CSV download: a member's own, or the whole club's with vessels.read_all. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const query = validQuery(event, VesselListQuerySchema)
  const { header, rows } = await vesselsExport({ clubId: actor.club.id, membershipId: actor.membership.id, readAll: actorCan(actor, 'vessels.read_all') }, query)
  return sendCsv(event, 'vessels.csv', header, rows)
})
