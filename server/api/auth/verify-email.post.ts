import { TokenSchema } from '#shared/schemas/auth'
import type { EmailVerifiedDto } from '#shared/types/accounts'
import { verifyEmail } from '../../services/accounts'

/** Confirm an e-mail address from the e-mailed link (no sign-in needed). 422 when the link is used, expired or unknown. */
export default defineEventHandler(async (event): Promise<EmailVerifiedDto> => {
  const { token } = await validBody(event, TokenSchema)
  return verifyEmail(token)
})
