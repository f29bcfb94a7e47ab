import { TokenSchema } from '#shared/schemas/auth'
import type { GuardianConsentDto } from '#shared/types/accounts'
import { guardianConsentPreview } from '../../services/accounts'

/** What a guardian's consent link is about (the junior and the club), without using it. 422 when it cannot be used. */
export default defineEventHandler(async (event): Promise<GuardianConsentDto> => {
  const { token } = await validBody(event, TokenSchema)
  return guardianConsentPreview(token)
})
