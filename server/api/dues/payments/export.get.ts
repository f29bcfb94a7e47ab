import { PaymentListQuerySchema } from '#shared/schemas/dues'
import { paymentsCsv } from '../../../services/dues'

/** Every payment the table's filters select, as a CSV download (dues.manage). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const query = validQuery(event, PaymentListQuerySchema)
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', 'attachment; filename="payments.csv"')
  return paymentsCsv(actor, query)
})
