import { IdParamSchema } from '#shared/schemas/common'
import { revokeSessions } from '../../../services/accounts'

/**
 * Signs out one of my sessions (another device, or this one — then the cookie is cleared too).
 * 404 when it is not mine or has already ended.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const current = id === actor.sessionId
  const ended = await revokeSessions({ sessionId: id, userId: actor.user.id }, current ? 'signed_out' : 'signed_out_elsewhere', actor.address ?? null)
  if (!ended) notFound('No such session')
  if (current) await clearUserSession(event)
  return { ok: true }
})
