import { ResetPasswordSchema } from '#shared/schemas/auth'
import type { MessageDto } from '#shared/types/accounts'
import { resetPassword, withServerPassword } from '../../services/accounts'

// The route's schema: the shared one with the server's password field (also refuses common passwords).
const ResetPasswordBody = withServerPassword(ResetPasswordSchema)

/**
 * Set a new password from an e-mailed reset link (works once). 400 for a short or common password;
 * 422 when the link is used, expired or unknown.
 */
export default defineEventHandler(async (event): Promise<MessageDto> => {
  const { token, password } = await validBody(event, ResetPasswordBody)
  await resetPassword(token, password, requestAddress(event))
  return { ok: true, message: 'Your password has been changed. Sign in with the new one.' }
})
