import { ResetRequestSchema } from '../../../shared/schemas/auth'
import type { MessageDto } from '../../../shared/types/accounts'
import { requestPasswordReset } from '../../services/accounts'

/** The one answer, whether or not an account uses the e-mail: it must never reveal which. */
const RESET_REQUESTED: MessageDto = {
  ok: true,
  message: 'If an account uses this e-mail, a link to choose a new password is on its way. It works once, within an hour.',
}

/** Ask for a password-reset link. Always 200 with the same body (400 only for a malformed address). */
export default defineEventHandler(async (event): Promise<MessageDto> => {
  const { email } = await validBody(event, ResetRequestSchema)
  await requestPasswordReset(email)
  return RESET_REQUESTED
})
