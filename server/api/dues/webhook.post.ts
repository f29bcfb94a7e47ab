import { applyPaymentEvent, verifiedEvent } from '../../services/dues'

/**
 * The payment service's webhook: the signature checked over the raw body (400 when bad or stale,
 * nothing changes), then the event applied exactly once. 200 for every verified event, a replay and
 * an ignored type included, so the service stops retrying; a database failure answers 5xx and the
 * service tries again.
 */
export default defineEventHandler(async (event) => {
  const raw = await readRawBody(event, false)
  const verified = verifiedEvent(raw, getHeader(event, 'stripe-signature'))
  return { received: true, outcome: await applyPaymentEvent(verified) }
})
