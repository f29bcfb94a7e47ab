import { OfflinePaymentSchema } from '#shared/schemas/dues'
import { recordOfflinePayment } from '../../../services/dues'

/** Records a cash or bank-transfer payment (dues.manage): it renews like a card payment; audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  const input = await validBody(event, OfflinePaymentSchema)
  return recordOfflinePayment(actor, input)
})
