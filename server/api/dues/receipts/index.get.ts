import { myReceipts } from '../../../services/dues'

/** The signed-in member's own receipts, newest first ("My standing"). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return { items: await myReceipts(actor) }
})
