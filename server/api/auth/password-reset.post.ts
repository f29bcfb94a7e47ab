import { ResetPasswordSchema } from '../../../shared/schemas/auth'
import type { MessageDto } from '../../../shared/types/accounts'
import { resetPassword } from '../../services/accounts'

/** Set a new password from an e-mailed reset link (works once). 422 when the link is used, expired or unknown. */
export default defineEventHandler(async (event): Promise<MessageDto> => {
  const { token, password } = await validBody(event, ResetPasswordSchema)
  await resetPassword(token, password, requestAddress(event))
  return { ok: true, message: 'Your password has been changed. Sign in with the new one.' }
})
