import { PaymentListQuerySchema } from '#shared/schemas/dues'
import { PAYMENT_CSV_HEADER, paymentRows } from '../../../services/dues'

/** Every payment the table's filters select, as a CSV download (dues.manage). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const rows = await paymentRows(actor, validQuery(event, PaymentListQuerySchema))
  return sendCsv(event, 'payments.csv', PAYMENT_CSV_HEADER, rows)
})
