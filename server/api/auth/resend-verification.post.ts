import type { MessageDto } from '#shared/types/accounts'
import { resendVerification } from '../../services/accounts'

/** E-mail the signed-in member a fresh verification link. 401 signed out; 422 already verified; 429 (with Retry-After) too many for the account or its address. */
export default defineEventHandler(async (event): Promise<MessageDto> => {
  const actor = await requireMember(event)
  const { sentTo } = await withRetryAfter(event, () => resendVerification(actor))
  return { ok: true, message: `A new link is on its way to ${sentTo}.` }
})
