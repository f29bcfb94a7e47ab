import { CheckoutStartSchema } from '#shared/schemas/dues'
import { startCheckout } from '../../../services/dues'

/** Starts a card renewal on a plan: returns the payment page's address (422 with reasons when the member may not pay). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { planId } = await validBody(event, CheckoutStartSchema)
  return startCheckout(actor, planId)
})
