import { IdParamSchema } from '#shared/schemas/common'
import { MemberPlanSchema } from '#shared/schemas/dues'
import { setMemberPlan } from '../../../../services/dues'

/** Sets the plan a member renews on (dues.manage); audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const { id } = validParams(event, IdParamSchema)
  const { planId } = await validBody(event, MemberPlanSchema)
  return setMemberPlan(actor, id, planId)
})
