// Helpers for the dues tests: a member signed in, a card checkout paid on the payment fake's page,
// events signed like the payment service signs them.
import { createHmac, randomBytes } from 'node:crypto'
import { inject } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeMember, type MemberOverrides, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import { testEnv } from '../../support/test-env'

export const CARDS = {
  success: '4242424242424242',
  generic: '4000000000000002',
  insufficient: '4000000000009995',
  expired: '4000000000000069',
  cvc: '4000000000000127',
  luhnFails: '4242424242424241',
} as const

export interface Payer extends MadeMember { cookie: string }

/** A member of the demo club, signed in. */
export async function payer(o: MemberOverrides = {}): Promise<Payer> {
  const m = await makeMember(o)
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

/** The plan with `code` (adult, junior, student) of the demo club. */
export async function planId(code: string): Promise<string> {
  const [row] = await sql<{ id: string }>(`SELECT p.id FROM dues_plans p JOIN clubs c ON c.id = p.club_id WHERE c.tag_prefix = 'SRG' AND p.code = $1`, [code])
  return row!.id
}

/** Starts a checkout as `who`; returns the API's answer. */
export function startCheckout(who: Payer, plan: string) {
  // A 200 carries { url, paymentId }; a 422 { data: { reasons } }.
  return api('/api/dues/checkout', { as: who.cookie, body: { planId: plan } })
}

/** Types `number` on the fake's hosted page for checkout `url` (as a browser form would); returns status and location. */
export async function payOnPage(url: string, number: string, expiry = '12/40', cvc = '123'): Promise<{ status: number, location: string | null, html: string }> {
  const res = await fetch(url, {
    method: 'POST', redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ number, expiry, cvc }).toString(),
  })
  return { status: res.status, location: res.headers.get('location'), html: await res.text() }
}

/** The membership's paid-through date (YYYY-MM-DD or null). */
export async function paidThroughOf(memberId: string): Promise<string | null> {
  const [row] = await sql<{ paid_through: string | null }>('SELECT paid_through::text AS paid_through FROM memberships WHERE id = $1', [memberId])
  return row!.paid_through
}

export interface PaymentRowT { id: string, status: string, method: string, paid_on: string | null, paid_through_before: string | null, paid_through_after: string | null, receipt_number: number | null, failure_message: string | null, provider_payment_intent_id: string | null, provider_checkout_id: string | null }

/** The payments of a membership, oldest first. */
export function paymentsOf(memberId: string): Promise<PaymentRowT[]> {
  return sql<PaymentRowT>(`SELECT id, status, method, paid_on::text AS paid_on, paid_through_before::text AS paid_through_before,
    paid_through_after::text AS paid_through_after, receipt_number, failure_message, provider_payment_intent_id, provider_checkout_id
    FROM payments WHERE membership_id = $1 ORDER BY created_at`, [memberId])
}

/** Polls `check` until it returns something truthy. */
export async function eventually<T>(check: () => Promise<T | null | undefined | false>, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = await check()
    if (value) return value
    if (Date.now() > deadline) throw new Error('condition not met in time')
    await new Promise(r => setTimeout(r, 200))
  }
}

/**
 * The header the payment service sends: `t=<seconds>,v1=<HMAC-SHA256(secret, "t.payload") in hex>`
 * (the service's published webhook documentation, "verify signatures manually"). Written here from
 * that description, not with the SDK the app uses.
 */
export function signatureHeader(payload: string, secret = testEnv.paymentKeys.webhookSecret, t = Math.floor(Date.now() / 1000)): string {
  return `t=${t},v1=${createHmac('sha256', secret).update(`${t}.${payload}`).digest('hex')}`
}

/** Posts `event` to the app's webhook, signed (or with the header given). */
export async function deliver(event: object, header?: string) {
  const payload = JSON.stringify(event)
  const res = await fetch(new URL('/api/dues/webhook', inject('baseUrl')), {
    method: 'POST', body: payload, headers: { 'content-type': 'application/json', 'stripe-signature': header ?? signatureHeader(payload) },
  })
  return { status: res.status, body: await res.json().catch(() => null) }
}

/** An event of the payment service's shape. */
export function event(type: string, object: object, created = Math.floor(Date.now() / 1000)) {
  return { id: `evt_${randomBytes(12).toString('hex')}`, object: 'event', api_version: '2026-10-28.endive', created, livemode: false, pending_webhooks: 1, request: { id: null, idempotency_key: null }, type, data: { object } }
}
