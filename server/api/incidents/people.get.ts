import { IncidentPeopleQuerySchema } from '#shared/schemas/incidents'
import { findPeopleToName } from '../../services/incidents'

/** The report form's search for the people involved (any signed-in member): ids and names of the club's members, by part of the name. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { q } = validQuery(event, IncidentPeopleQuerySchema)
  return { items: await findPeopleToName(actor, q) }
})
