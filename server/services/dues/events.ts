import type Stripe from 'stripe'
import { QueryTypes, type Transaction } from 'sequelize'
import { lockProviderPayment } from '../../utils/locks'
import { kickNoticeQueue } from '../notices'
import { findPayment, refundPayment, settlePayment } from './ledger'
import { usePayments, webhookSecret } from './provider'

export type EventOutcome = 'applied' | 'ignored' | 'held' | 'replay'

/**
 * The payment service's webhook body checked with the SDK (`constructEvent`: the `t=…,v1=…` header,
 * HMAC-SHA256 over "t.body" with the endpoint secret, at most 300 s old). A bad or stale signature is
 * a 400 and nothing else happens.
 */
export function verifiedEvent(rawBody: Buffer | string | undefined, signature: string | undefined): Stripe.Event {
  let event: Stripe.Event
  try {
    event = usePayments().webhooks.constructEvent(rawBody ?? '', signature ?? '', webhookSecret())
  }
  catch (error) {
    if ((error as { statusCode?: number }).statusCode === 503) throw error
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The signature of this event does not match' })
  }
  // Signed but not an event (only a holder of the secret could send it): refused all the same.
  const shaped = event as Partial<Stripe.Event> | null
  if (!shaped || typeof shaped.id !== 'string' || typeof shaped.type !== 'string' || typeof shaped.data?.object !== 'object' || typeof shaped.created !== 'number') {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'Not an event' })
  }
  return event
}

const idOf = (v: string | { id: string } | null | undefined) => (typeof v === 'string' ? v : v?.id ?? null)

/**
 * Applies one verified event exactly once. Its id goes into `payment_events` first: a replay finds it
 * there and changes nothing. Completed checkouts count their payment; expired ones and failed tries
 * are noted; a succeeded refund refunds the payment — or, when the payment's completion has not come
 * yet (events may arrive in any order), waits 'held' and is applied right after that completion.
 * Other types are stored as ignored.
 */
export async function applyPaymentEvent(event: Stripe.Event): Promise<EventOutcome> {
  const outcome = await inTransaction(async (transaction) => {
    const rows = await useDb().query<{ id: string }>(`
      INSERT INTO payment_events (id, type, status, payload) VALUES (:id, :type, 'ignored', :payload)
      ON CONFLICT (id) DO NOTHING RETURNING id`,
    { replacements: { id: event.id, type: event.type, payload: JSON.stringify(event) }, type: QueryTypes.SELECT, transaction })
    if (!rows.length) return 'replay' as const
    const result = await dispatch(event, transaction)
    await useDb().query(`UPDATE payment_events SET status = :status, waits_for = :waitsFor, applied_at = CASE WHEN :status = 'applied' THEN now() END WHERE id = :id`, {
      replacements: { id: event.id, status: result.outcome, waitsFor: result.waitsFor ?? null }, transaction,
    })
    return result.outcome
  })
  if (outcome === 'applied') kickNoticeQueue()
  return outcome
}

async function dispatch(event: Stripe.Event, transaction: Transaction): Promise<{ outcome: 'applied' | 'ignored' | 'held', waitsFor?: string }> {
  switch (event.type) {
    case 'checkout.session.completed': {
      const session = event.data.object
      const intent = idOf(session.payment_intent)
      if (intent) await lockProviderPayment(intent, transaction)
      const payment = await findPayment('provider_checkout_id', session.id, transaction)
      if (!payment || session.payment_status !== 'paid') return { outcome: 'ignored' }
      // The payment's own instant (the event's creation), not this delivery's arrival, dates it.
      const settled = await settlePayment(payment.id, new Date(event.created * 1000), transaction, { paymentIntentId: intent })
      if (settled === null) return { outcome: 'ignored' }
      if (intent) await applyHeldEvents(intent, transaction)
      return { outcome: 'applied' }
    }
    case 'checkout.session.expired': {
      const rows = await useDb().query(`UPDATE payments SET status = 'expired', updated_at = now()
        WHERE provider_checkout_id = :id AND status IN ('pending', 'failed') RETURNING id`,
      { replacements: { id: event.data.object.id }, type: QueryTypes.SELECT, transaction })
      return { outcome: rows.length ? 'applied' : 'ignored' }
    }
    case 'payment_intent.payment_failed': {
      const intent = event.data.object
      const error = intent.last_payment_error
      const rows = await useDb().query(`UPDATE payments SET status = 'failed', failure_code = :code, failure_message = :message, updated_at = now()
        WHERE status IN ('pending', 'failed') AND method = 'card'
          AND (provider_payment_intent_id = :id OR id::text = :paymentId) RETURNING id`, {
        replacements: { id: intent.id, paymentId: String(intent.metadata?.paymentId ?? ''), code: (error?.decline_code ?? error?.code ?? 'card_declined').slice(0, 60), message: (error?.message ?? 'The card was declined.').slice(0, 300) },
        type: QueryTypes.SELECT,
        transaction,
      })
      return { outcome: rows.length ? 'applied' : 'ignored' }
    }
    case 'refund.updated':
      return applyRefundEvent(event.data.object, transaction)
    default:
      return { outcome: 'ignored' }
  }
}

async function applyRefundEvent(refund: Stripe.Refund, transaction: Transaction): Promise<{ outcome: 'applied' | 'ignored' | 'held', waitsFor?: string }> {
  const intent = idOf(refund.payment_intent)
  if (refund.status !== 'succeeded' || !intent) return { outcome: 'ignored' }
  await lockProviderPayment(intent, transaction)
  const payment = await findPayment('provider_payment_intent_id', intent, transaction)
  // Not counted yet: the completion of this payment is still on its way.
  if (!payment || payment.status === 'pending' || payment.status === 'failed') return { outcome: 'held', waitsFor: intent }
  const done = await refundPayment(payment.id, transaction, { latestOnly: false, providerRefundId: refund.id, note: 'Refunded at the payment service' })
  return { outcome: done ? 'applied' : 'ignored' }
}

/** Applies the events held for payment intent `intent` now that its completion has been counted. */
async function applyHeldEvents(intent: string, transaction: Transaction): Promise<void> {
  const held = await useDb().query<{ id: string, payload: Stripe.Event }>(
    `SELECT id, payload FROM payment_events WHERE status = 'held' AND waits_for = :intent ORDER BY received_at FOR UPDATE`,
    { replacements: { intent }, type: QueryTypes.SELECT, transaction })
  for (const row of held) {
    const result = row.payload.type === 'refund.updated'
      ? await applyRefundEvent(row.payload.data.object as Stripe.Refund, transaction)
      : { outcome: 'ignored' as const }
    await useDb().query(`UPDATE payment_events SET status = :status, waits_for = NULL, applied_at = now() WHERE id = :id`,
      { replacements: { id: row.id, status: result.outcome === 'held' ? 'ignored' : result.outcome }, transaction })
  }
}
