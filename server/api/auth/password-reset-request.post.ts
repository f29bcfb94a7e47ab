import { ResetRequestSchema } from '#shared/schemas/auth'
import type { MessageDto } from '#shared/types/accounts'
import { requestPasswordReset, tokenLifetimeWords } from '../../services/accounts'

/** The one answer, whether or not an account uses the e-mail: it must never reveal which. */
const RESET_REQUESTED: MessageDto = {
  ok: true,
  message: `If an account uses this e-mail, a link to choose a new password is on its way. It works once and expires in ${tokenLifetimeWords('reset_password')}.`,
}

/**
 * Ask for a password-reset link. Always 200 with the same body, answered before any look-up (400
 * only for a malformed address; 429 past the requests an address may make in an hour).
 */
export default defineEventHandler(async (event): Promise<MessageDto> => {
  const { email } = await validBody(event, ResetRequestSchema)
  await withRetryAfter(event, () => countResetRequest(requestAddress(event)))
  // Not awaited: a known and an unknown e-mail are answered in the same time, so the reply's timing
  // never reveals an account. A failure is logged (the member can ask again).
  event.waitUntil(requestPasswordReset(email).catch((error: unknown) => {
    console.error('[accounts] a password-reset request failed:', error)
  }))
  return RESET_REQUESTED
})
