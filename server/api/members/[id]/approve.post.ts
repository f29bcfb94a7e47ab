import { IdParamSchema } from '#shared/schemas/common'
import { MembershipActionSchema } from '#shared/schemas/member'
import { changeMembership } from '../../../services/members'

/** Approves a never-approved pending sign-up (members.manage) and e-mails the member; 422 otherwise. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const { reason } = await validBody(event, MembershipActionSchema)
  return changeMembership(actor, id, 'approve', reason)
})
