import { IdParamSchema } from '#shared/schemas/common'
import { MembershipActionSchema } from '#shared/schemas/member'
import { changeMembership } from '../../../services/members'

/** Marks a membership resigned (members.manage) with a reason; 422 when already resigned, or your own. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const { reason } = await validBody(event, MembershipActionSchema)
  return changeMembership(actor, id, 'resign', reason)
})
