import { IdParamSchema } from '#shared/schemas/common'
import { receiptFor } from '../../../services/dues'

/** One receipt: the member's own, or any with dues.manage (404 otherwise). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return receiptFor(actor, id)
})
