import type { SessionDto } from '#shared/types/accounts'
import { listSessions } from '../../../services/accounts'

/** My sessions that have not ended (device, address, last seen), the one this request came with marked. */
export default defineEventHandler(async (event): Promise<SessionDto[]> => {
  const actor = await requireMember(event)
  return listSessions(actor.user.id, actor.sessionId)
})
