import Stripe from 'stripe'

let client: Stripe | null = null

/** 503 when no secret key is configured: card payments are switched off, offline payments still work. */
function notConfigured(): never {
  throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'Card payments are not set up on this server' })
}

/**
 * The payment service's official SDK, made once from runtimeConfig. With `paymentsApiHost` (and port,
 * protocol) set it talks to that address — the local payment fake in the demo and the tests; without
 * them, to the real service unchanged. The app reaches the payment service only through this.
 */
export function usePayments(): Stripe {
  if (client) return client
  const config = useRuntimeConfig()
  const key = String(config.paymentsSecretKey ?? '')
  if (!key) notConfigured()
  const host = String(config.paymentsApiHost ?? '')
  client = new Stripe(key, {
    ...(host
      ? {
          host,
          port: Number(config.paymentsApiPort) || undefined,
          protocol: (String(config.paymentsApiProtocol || 'https')) as 'http' | 'https',
        }
      : {}),
    maxNetworkRetries: 1,
    timeout: 15_000,
    appInfo: { name: 'Hoopwise' },
  })
  return client
}

/** The webhook endpoint's secret, or a 503 when none is configured. */
export function webhookSecret(): string {
  const secret = String(useRuntimeConfig().paymentsWebhookSecret ?? '')
  if (!secret) notConfigured()
  return secret
}

/** The payment service refused a request (a card, a refund): its message, for a 422 with a reason. */
export function providerRefusal(error: unknown): { code: string, message: string } | null {
  if (error instanceof Stripe.errors.StripeError && error.statusCode && error.statusCode < 500) {
    return { code: 'PAYMENT_SERVICE_REFUSED', message: error.message }
  }
  return null
}
