import { IdParamSchema } from '#shared/schemas/common'
import { RefundSchema } from '#shared/schemas/dues'
import { refundLatestPayment } from '../../../../services/dues'

/** Refunds the latest payment of a membership in full (dues.manage); paid-through returns to the date it replaced. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const { id } = validParams(event, IdParamSchema)
  const { note } = await validBody(event, RefundSchema)
  return refundLatestPayment(actor, id, note ?? null)
})
