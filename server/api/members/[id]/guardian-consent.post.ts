import { IdParamSchema } from '#shared/schemas/common'
import { MembershipActionSchema } from '#shared/schemas/member'
import { resendGuardianConsent } from '../../../services/members'

/** E-mails a junior's guardian a fresh consent link (members.manage) with a reason; 422 when no consent is due; 429 past the guardian's e-mails for the day. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const { reason } = await validBody(event, MembershipActionSchema)
  return withRetryAfter(event, () => resendGuardianConsent(actor, id, reason))
})
