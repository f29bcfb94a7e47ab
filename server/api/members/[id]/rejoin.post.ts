import { IdParamSchema } from '#shared/schemas/common'
import { MembershipActionSchema } from '#shared/schemas/member'
import { changeMembership } from '../../../services/members'

/** Clears a resignation so the member can pay again (members.manage); 422 when not resigned. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const { reason } = await validBody(event, MembershipActionSchema)
  return changeMembership(actor, id, 'rejoin', reason)
})
