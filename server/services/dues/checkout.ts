import { randomUUID } from 'node:crypto'
import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { clubBaseUrl, clubToday } from '../clubs'
import { duesRefusals } from '#shared/utils/dues-renewal'
import type { CheckoutStateDto } from '#shared/types/dues'
import { planOpenTo } from './plans'
import { providerRefusal, usePayments } from './provider'

/**
 * Starts a card renewal for the signed-in member on plan `planId`: refuses (422) a sign-up awaiting
 * approval, a suspended or resigned member, and a plan not open to their age; creates a hosted
 * checkout session through the SDK and a pending payment for it. Returns the payment page's address.
 */
export async function startCheckout(actor: Actor, planId: string): Promise<{ url: string, paymentId: string }> {
  const refusals = duesRefusals(actor.status, actor.membership.approvedAt)
  if (refusals.length) refuse(refusals)
  const club = actor.club
  const plan = await planOpenTo(club.id, planId, actor.membership.birthDate, clubToday(club))
  const payments = usePayments()
  const paymentId = randomUUID()
  const base = clubBaseUrl(club)
  const [previous] = await useDb().query<{ provider_customer_id: string }>(`SELECT provider_customer_id FROM payments
    WHERE membership_id = :id AND provider_customer_id IS NOT NULL ORDER BY created_at DESC LIMIT 1`,
  { replacements: { id: actor.membership.id }, type: QueryTypes.SELECT })
  let session
  let customer = previous?.provider_customer_id
  try {
    customer ??= (await payments.customers.create({ email: actor.user.email, name: actor.user.name, metadata: { membershipId: actor.membership.id } })).id
    session = await payments.checkout.sessions.create({
      mode: 'payment',
      customer,
      client_reference_id: actor.membership.id,
      line_items: [{ quantity: 1, price_data: { currency: plan.currency.toLowerCase(), unit_amount: plan.priceMinor, product_data: { name: `${club.name} dues: ${plan.name}, ${plan.periodMonths} months` } } }],
      metadata: { paymentId, membershipId: actor.membership.id, clubId: club.id },
      payment_intent_data: { metadata: { paymentId, membershipId: actor.membership.id, clubId: club.id } },
      success_url: `${base}/dues/return?payment=${paymentId}`,
      cancel_url: `${base}/dues/return?payment=${paymentId}&back=1`,
    }, { idempotencyKey: `checkout-${paymentId}` })
  }
  catch (error) {
    const refusal = providerRefusal(error)
    if (refusal) refuse(refusal)
    throw createError({ statusCode: 502, statusMessage: 'Bad Gateway', message: 'The payment service did not answer; try again in a moment.' })
  }
  await useDb().query(`
    INSERT INTO payments (id, club_id, membership_id, plan_id, plan_name, method, status, amount_minor, currency, period_months,
      provider_customer_id, provider_checkout_id, provider_payment_intent_id)
    VALUES (:id, :clubId, :membershipId, :planId, :planName, 'card', 'pending', :amount, :currency, :period, :customer, :checkout, :intent)`, {
    replacements: {
      id: paymentId, clubId: club.id, membershipId: actor.membership.id, planId: plan.id, planName: plan.name, amount: plan.priceMinor,
      currency: plan.currency, period: plan.periodMonths, customer, checkout: session.id,
      intent: typeof session.payment_intent === 'string' ? session.payment_intent : null,
    },
  })
  return { url: session.url!, paymentId }
}

/** The state of the signed-in member's own payment `paymentId` (404 when not theirs), for the return page. */
export async function checkoutState(actor: Actor, paymentId: string): Promise<CheckoutStateDto> {
  const [row] = await useDb().query<{ status: CheckoutStateDto['status'], paid_through_after: string | null, failure_message: string | null }>(`
    SELECT status, paid_through_after::text AS paid_through_after, failure_message FROM payments
    WHERE id = :id AND membership_id = :membershipId AND club_id = :clubId`,
  { replacements: { id: paymentId, membershipId: actor.membership.id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!row) notFound('No such payment')
  return {
    status: row.status,
    paidThrough: row.paid_through_after,
    failureMessage: row.failure_message,
    receiptId: row.status === 'paid' || row.status === 'refunded' ? paymentId : null,
  }
}
