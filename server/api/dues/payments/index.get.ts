import { PaymentListQuerySchema } from '#shared/schemas/dues'
import { listPayments } from '../../../services/dues'

/** The club's payments, filtered, sorted and paged by the server (dues.manage). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const query = validQuery(event, PaymentListQuerySchema)
  return listPayments(actor, query)
})
