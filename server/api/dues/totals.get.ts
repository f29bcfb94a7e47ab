import { monthlyTotals } from '../../services/dues'

/** Dues received and refunded per month and currency, the last twelve months (dues.manage). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  return { items: await monthlyTotals(actor) }
})
