import { IdParamSchema } from '#shared/schemas/common'
import { DuesPlanEditSchema } from '#shared/schemas/dues'
import { editPlan, listPlans } from '../../../services/dues'

/** Changes a dues plan's name, price, currency and period (dues.manage); audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, DuesPlanEditSchema)
  await editPlan(actor, id, input)
  return { items: await listPlans(actor.club.id) }
})
