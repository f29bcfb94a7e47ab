import { TokenSchema } from '#shared/schemas/auth'
import type { GuardianConsentDto } from '#shared/types/accounts'
import { confirmGuardianConsent } from '../../services/accounts'

/** A guardian consents to a junior's membership from the e-mailed link (works once; audited). 422 when it cannot be used. */
export default defineEventHandler(async (event): Promise<GuardianConsentDto> => {
  const { token } = await validBody(event, TokenSchema)
  return confirmGuardianConsent(token)
})
