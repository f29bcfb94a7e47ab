import { SessionListQuerySchema } from '#shared/schemas/training'
import { listSessions } from '../../../services/training'

/** The club's training sessions still to come (or of the last 90 days), each with the caller's place. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { when } = validQuery(event, SessionListQuerySchema)
  return listSessions(actor, when)
})
