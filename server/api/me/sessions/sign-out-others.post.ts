import { SignOutOthersSchema } from '#shared/schemas/auth'
import type { SessionsEndedDto } from '#shared/types/accounts'
import { revokeSessions } from '../../../services/accounts'

/** Signs out every other session of my account, keeping this one; the body confirms it ({ confirm: true }). */
export default defineEventHandler(async (event): Promise<SessionsEndedDto> => {
  const actor = await requireMember(event)
  await validBody(event, SignOutOthersSchema)
  const ended = await revokeSessions({ userId: actor.user.id, exceptId: actor.sessionId }, 'signed_out_elsewhere', actor.address ?? null)
  return { ended }
})
