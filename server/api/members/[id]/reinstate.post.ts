import { IdParamSchema } from '#shared/schemas/common'
import { MembershipActionSchema } from '#shared/schemas/member'
import { changeMembership } from '../../../services/members'

/** Lifts a suspension (members.manage) with a reason; 422 when the membership is not suspended. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const { reason } = await validBody(event, MembershipActionSchema)
  return changeMembership(actor, id, 'reinstate', reason)
})
