#!/usr/bin/env node
// A TEST DOUBLE of the card-payment service, for `npm start` (demo) and `npm test` only: it stands in
// for the real service on loopback so the app's official SDK can be exercised without a network or
// an account. It is independent of the app (plain Node, no app imports). What it does, and what it
// does not, is in README.md beside this file.
import { createHmac, randomBytes } from 'node:crypto'
import { createServer } from 'node:http'

const config = {
  port: Number(process.env.PAYMENT_FAKE_PORT ?? 12111),
  secretKey: process.env.PAYMENT_FAKE_SECRET_KEY ?? 'sk_test_hoopwise_fake',
  webhookUrl: process.env.PAYMENT_FAKE_WEBHOOK_URL ?? '',
  webhookSecret: process.env.PAYMENT_FAKE_WEBHOOK_SECRET ?? 'whsec_hoopwise_fake',
  // First retry after this many ms, doubling up to retryMaxMs; gives up after maxAttempts.
  retryBaseMs: Number(process.env.PAYMENT_FAKE_RETRY_BASE_MS ?? 250),
  retryMaxMs: Number(process.env.PAYMENT_FAKE_RETRY_MAX_MS ?? 4000),
  maxAttempts: Number(process.env.PAYMENT_FAKE_MAX_ATTEMPTS ?? 25),
}
const API_VERSION = '2026-10-28.endive'
const PAGE_BASE = `http://127.0.0.1:${config.port}`

// The published test cards of the real service's testing documentation: one succeeds, the others
// decline the way the real service does. Any other number that passes the Luhn check is declined as
// a non-test card, as in the real service's test mode.
const TEST_CARDS = {
  4242424242424242: null,
  4000000000000002: { code: 'card_declined', decline_code: 'generic_decline', message: 'Your card was declined.' },
  4000000000009995: { code: 'card_declined', decline_code: 'insufficient_funds', message: 'Your card has insufficient funds.' },
  4000000000000069: { code: 'expired_card', decline_code: 'expired_card', message: 'Your card has expired.' },
  4000000000000127: { code: 'incorrect_cvc', decline_code: 'incorrect_cvc', message: 'Your card\'s security code is incorrect.' },
}
const NOT_A_TEST_CARD = { code: 'card_declined', decline_code: 'test_mode_live_card', message: 'Your card was declined. Your request was in test mode, but used a non test card.' }

const store = { customers: new Map(), sessions: new Map(), intents: new Map(), refunds: new Map(), events: new Map() }
/** Every webhook delivery attempt, for tests: { eventId, type, attempt, status }. */
const deliveries = []

const now = () => Math.floor(Date.now() / 1000)
const newId = prefix => `${prefix}_${randomBytes(12).toString('hex')}`

/** Luhn check (ISO/IEC 7812-1 check digit). */
function luhnValid(digits) {
  let sum = 0
  for (let i = 0; i < digits.length; i++) {
    let d = Number(digits[digits.length - 1 - i])
    if (i % 2 === 1) {
      d *= 2
      if (d > 9) d -= 9
    }
    sum += d
  }
  return digits.length >= 12 && sum % 10 === 0
}

/** Parses a form-encoded body with the SDK's bracket keys (`a[b][0][c]=v`) into nested objects. */
function parseForm(body) {
  const out = {}
  for (const [key, value] of new URLSearchParams(body)) {
    const path = key.replace(/\]/g, '').split('[')
    let node = out
    path.forEach((part, i) => {
      if (i === path.length - 1) node[part] = value
      else node = node[part] ??= {}
    })
  }
  return out
}

/** The real service's error shape. */
function apiError(res, status, type, message, extra = {}) {
  send(res, status, { error: { type, message, ...extra } })
}

function send(res, status, body) {
  res.writeHead(status, { 'content-type': 'application/json', 'request-id': newId('req') })
  res.end(JSON.stringify(body))
}

function html(res, status, body) {
  res.writeHead(status, { 'content-type': 'text/html; charset=utf-8' })
  res.end(body)
}

const escapeHtml = s => String(s).replace(/[&<>"']/g, c => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', '\'': '&#39;' })[c])

// ---- events and signed webhook deliveries ----

/** `t=<unix seconds>,v1=<hex HMAC-SHA256 of "t.payload" keyed with the endpoint secret>`. */
function signature(payload, secret, t = now()) {
  return `t=${t},v1=${createHmac('sha256', secret).update(`${t}.${payload}`).digest('hex')}`
}

function emit(type, object) {
  const event = {
    id: newId('evt'), object: 'event', api_version: API_VERSION, created: now(), livemode: false,
    pending_webhooks: config.webhookUrl ? 1 : 0, request: { id: null, idempotency_key: null }, type,
    data: { object: structuredClone(object) },
  }
  store.events.set(event.id, event)
  if (config.webhookUrl) void deliver(event)
  return event
}

/** Delivers `event` until the endpoint answers 2xx, waiting longer after each failure. */
async function deliver(event) {
  const payload = JSON.stringify(event)
  for (let attempt = 1; attempt <= config.maxAttempts; attempt++) {
    let status = 0
    try {
      const res = await fetch(config.webhookUrl, {
        method: 'POST',
        headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': signature(payload, config.webhookSecret), 'user-agent': 'payment-fake/1.0' },
        body: payload,
        signal: AbortSignal.timeout(10_000),
      })
      status = res.status
      await res.arrayBuffer()
    }
    catch { /* the app is down: retried below */ }
    deliveries.push({ eventId: event.id, type: event.type, attempt, status })
    if (status >= 200 && status < 300) return
    await new Promise(r => setTimeout(r, Math.min(config.retryBaseMs * 2 ** (attempt - 1), config.retryMaxMs)))
  }
}

// ---- API objects ----

function createCustomer(p) {
  const c = { id: newId('cus'), object: 'customer', created: now(), email: p.email ?? null, name: p.name ?? null, metadata: p.metadata ?? {}, livemode: false }
  store.customers.set(c.id, c)
  return c
}

function createSession(p, res) {
  const item = p.line_items?.['0']
  const price = item?.price_data
  if (!item || !price?.unit_amount || !price?.currency) return apiError(res, 400, 'invalid_request_error', 'Missing required param: line_items[0][price_data].', { code: 'parameter_missing', param: 'line_items' })
  if (!p.success_url) return apiError(res, 400, 'invalid_request_error', 'Missing required param: success_url.', { code: 'parameter_missing', param: 'success_url' })
  if (p.customer && !store.customers.has(p.customer)) return apiError(res, 400, 'invalid_request_error', `No such customer: '${p.customer}'`, { code: 'resource_missing', param: 'customer' })
  const amount = Number(price.unit_amount) * Number(item.quantity ?? 1)
  const currency = String(price.currency).toLowerCase()
  const intent = {
    id: newId('pi'), object: 'payment_intent', amount, amount_received: 0, currency, created: now(), customer: p.customer ?? null,
    status: 'requires_payment_method', last_payment_error: null, latest_charge: null, metadata: p.payment_intent_data?.metadata ?? {}, livemode: false,
  }
  store.intents.set(intent.id, intent)
  const id = newId('cs_test')
  const session = {
    id, object: 'checkout.session', mode: p.mode ?? 'payment', status: 'open', payment_status: 'unpaid',
    amount_subtotal: amount, amount_total: amount, currency, customer: p.customer ?? null, customer_email: p.customer_email ?? null,
    client_reference_id: p.client_reference_id ?? null, metadata: p.metadata ?? {}, payment_intent: intent.id,
    success_url: p.success_url, cancel_url: p.cancel_url ?? null, url: `${PAGE_BASE}/pay/${id}`,
    created: now(), expires_at: now() + 24 * 3600, livemode: false,
    product_name: price.product_data?.name ?? 'Payment',
  }
  store.sessions.set(id, session)
  send(res, 200, publicSession(session))
}

function publicSession(s) {
  const rest = { ...s }
  delete rest.product_name
  return rest
}

function createRefund(p, res) {
  const intent = store.intents.get(p.payment_intent ?? '')
  if (!intent) return apiError(res, 400, 'invalid_request_error', `No such payment_intent: '${p.payment_intent}'`, { code: 'resource_missing', param: 'payment_intent' })
  if (intent.status !== 'succeeded') return apiError(res, 400, 'invalid_request_error', 'This PaymentIntent does not have a successful charge to refund.', { code: 'charge_not_refundable' })
  if ([...store.refunds.values()].some(r => r.payment_intent === intent.id)) return apiError(res, 400, 'invalid_request_error', `Charge ${intent.latest_charge} has already been refunded.`, { code: 'charge_already_refunded' })
  const amount = p.amount ? Number(p.amount) : intent.amount
  const refund = {
    id: newId('re'), object: 'refund', amount, currency: intent.currency, charge: intent.latest_charge, payment_intent: intent.id,
    created: now(), metadata: p.metadata ?? {}, reason: p.reason ?? null, status: 'pending',
  }
  store.refunds.set(refund.id, refund)
  emit('refund.created', refund)
  // Card refunds settle at once here; the real service may take longer, hence the update event.
  refund.status = 'succeeded'
  emit('refund.updated', refund)
  send(res, 200, refund)
}

function expireSession(id, res) {
  const s = store.sessions.get(id)
  if (!s) return apiError(res, 404, 'invalid_request_error', `No such checkout.session: '${id}'`, { code: 'resource_missing', param: 'session' })
  if (s.status !== 'open') return apiError(res, 400, 'invalid_request_error', `Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of "${s.status}".`)
  s.status = 'expired'
  emit('checkout.session.expired', publicSession(s))
  send(res, 200, publicSession(s))
}

// ---- the hosted payment page (plainly a test page) ----

function page(s, { error = '', number = '' } = {}) {
  const money = `${s.currency.toUpperCase()} ${(s.amount_total / 100).toFixed(2)}`
  const closed = s.status !== 'open'
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>Test payment page</title>
<style>
body{font:16px/1.5 ui-monospace,Menlo,monospace;background:repeating-linear-gradient(45deg,#fffbe6,#fffbe6 18px,#fff3b0 18px,#fff3b0 36px);margin:0;padding:16px;color:#222}
main{max-width:420px;margin:auto;background:#fff;border:3px dashed #7a5b00;padding:20px}
h1{font-size:20px;margin:0 0 4px} .banner{background:#222;color:#ffe066;padding:6px 10px;font-weight:700;margin-bottom:12px}
label{display:block;margin-top:10px} input{font:inherit;width:100%;box-sizing:border-box;padding:8px;border:2px solid #555}
button{margin-top:16px;width:100%;padding:10px;font:inherit;font-weight:700;background:#7a5b00;color:#fff;border:0;cursor:pointer}
.error{background:#ffe1e1;border:2px solid #b00020;padding:8px;margin-top:12px} small{color:#555}
</style></head><body><main>
<div class="banner">TEST DOUBLE — no real card is ever charged</div>
<h1>Local test payment</h1>
<p>${escapeHtml(s.product_name)}<br><strong data-testid="fake-amount">${escapeHtml(money)}</strong></p>
${closed
  ? `<p data-testid="fake-closed">This checkout is ${escapeHtml(s.status)}.</p>`
  : `<form method="post" action="/pay/${escapeHtml(s.id)}">
<label for="number">Card number</label><input id="number" name="number" inputmode="numeric" autocomplete="off" data-testid="fake-card-number" value="${escapeHtml(number)}" required>
<label for="expiry">Expiry (MM/YY)</label><input id="expiry" name="expiry" data-testid="fake-expiry" placeholder="12/34" required>
<label for="cvc">CVC</label><input id="cvc" name="cvc" inputmode="numeric" data-testid="fake-cvc" required>
${error ? `<p class="error" role="alert" data-testid="fake-error">${escapeHtml(error)} Try another card, or go back.</p>` : ''}
<button type="submit" data-testid="fake-pay">Pay ${escapeHtml(money)} (test)</button>
</form>
<p><small>Published test numbers: 4242 4242 4242 4242 succeeds; 4000 0000 0000 0002, …9995, …0069 and …0127 decline.</small></p>`}
${s.cancel_url ? `<p><a href="${escapeHtml(s.cancel_url)}" data-testid="fake-cancel">Go back without paying</a></p>` : ''}
</main></body></html>`
}

function payOnPage(s, form, res) {
  if (s.status !== 'open') return html(res, 409, page(s))
  const number = String(form.number ?? '').replace(/[\s-]/g, '')
  if (!/^\d{12,19}$/.test(number) || !luhnValid(number)) return html(res, 400, page(s, { error: 'Your card number is invalid.', number: form.number }))
  const m = String(form.expiry ?? '').match(/^\s*(\d{1,2})\s*\/\s*(\d{2}|\d{4})\s*$/)
  const year = m ? (m[2].length === 2 ? 2000 + Number(m[2]) : Number(m[2])) : 0
  const today = new Date()
  if (!m || Number(m[1]) < 1 || Number(m[1]) > 12 || year * 12 + Number(m[1]) < today.getUTCFullYear() * 12 + today.getUTCMonth() + 1) {
    return html(res, 400, page(s, { error: 'Your card\'s expiration date is incomplete or in the past.', number: form.number }))
  }
  if (!/^\d{3,4}$/.test(String(form.cvc ?? ''))) return html(res, 400, page(s, { error: 'Your card\'s security code is incomplete.', number: form.number }))
  const intent = store.intents.get(s.payment_intent)
  const decline = number in TEST_CARDS ? TEST_CARDS[number] : NOT_A_TEST_CARD
  if (decline) {
    intent.last_payment_error = { type: 'card_error', ...decline }
    intent.status = 'requires_payment_method'
    emit('payment_intent.payment_failed', intent)
    return html(res, 402, page(s, { error: decline.message }))
  }
  intent.status = 'succeeded'
  intent.amount_received = intent.amount
  intent.last_payment_error = null
  intent.latest_charge = newId('ch')
  s.status = 'complete'
  s.payment_status = 'paid'
  emit('payment_intent.succeeded', intent)
  emit('checkout.session.completed', publicSession(s))
  res.writeHead(303, { location: s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id) })
  res.end()
}

// ---- routing ----

function authorised(req) {
  const auth = req.headers.authorization ?? ''
  const key = auth.startsWith('Bearer ') ? auth.slice(7) : Buffer.from(auth.replace(/^Basic /, ''), 'base64').toString().replace(/:$/, '')
  return key === config.secretKey
}

// Deleting a customer answers as the real service does: `{ id, object, deleted: true }`; 404 when unknown.
function deleteCustomer(id, res) {
  if (!store.customers.delete(id)) return apiError(res, 404, 'invalid_request_error', `No such customer: '${id}'`, { code: 'resource_missing', param: 'id' })
  send(res, 200, { id, object: 'customer', deleted: true })
}

function retrieve(map, id, name, res, shape = o => o) {
  const found = map.get(id)
  if (!found) return apiError(res, 404, 'invalid_request_error', `No such ${name}: '${id}'`, { code: 'resource_missing', param: 'id' })
  send(res, 200, shape(found))
}

async function handle(req, res) {
  const url = new URL(req.url, PAGE_BASE)
  const chunks = []
  for await (const c of req) chunks.push(c)
  const body = Buffer.concat(chunks).toString()
  const path = url.pathname

  if (path === '/health') return send(res, 200, { ok: true })
  const pay = path.match(/^\/pay\/(cs_test_[a-f0-9]+)$/)
  if (pay) {
    const s = store.sessions.get(pay[1])
    if (!s) return html(res, 404, '<!doctype html><title>Not found</title><p>No such test checkout.</p>')
    return req.method === 'POST' ? payOnPage(s, parseForm(body), res) : html(res, 200, page(s))
  }
  // Controls for tests only (the real service has none): point the webhooks elsewhere, read the attempts.
  if (path === '/_fake/webhook' && req.method === 'POST') {
    config.webhookUrl = JSON.parse(body || '{}').url ?? config.webhookUrl
    return send(res, 200, { url: config.webhookUrl })
  }
  if (path === '/_fake/deliveries') return send(res, 200, { data: deliveries })

  if (!path.startsWith('/v1/')) return apiError(res, 404, 'invalid_request_error', `Unrecognized request URL (${req.method}: ${path}).`)
  if (!authorised(req)) {
    return apiError(res, 401, 'invalid_request_error', 'Invalid API Key provided. You can find your API keys in the dashboard.')
  }
  const params = req.method === 'POST' ? parseForm(body) : Object.fromEntries(url.searchParams)
  const route = `${req.method} ${path.replace(/\/(cus|cs_test|pi|re|evt)_[a-f0-9]+/, '/:id')}`
  const id = path.match(/\/((?:cus|cs_test|pi|re|evt)_[a-f0-9]+)/)?.[1]
  switch (route) {
    case 'POST /v1/customers': return send(res, 200, createCustomer(params))
    case 'GET /v1/customers/:id': return retrieve(store.customers, id, 'customer', res)
    case 'DELETE /v1/customers/:id': return deleteCustomer(id, res)
    case 'POST /v1/checkout/sessions': return createSession(params, res)
    case 'GET /v1/checkout/sessions/:id': return retrieve(store.sessions, id, 'checkout.session', res, publicSession)
    case 'POST /v1/checkout/sessions/:id/expire': return expireSession(id, res)
    case 'GET /v1/payment_intents/:id': return retrieve(store.intents, id, 'payment_intent', res)
    case 'POST /v1/refunds': return createRefund(params, res)
    case 'GET /v1/refunds/:id': return retrieve(store.refunds, id, 'refund', res)
    case 'GET /v1/events/:id': return retrieve(store.events, id, 'event', res)
    default: return apiError(res, 404, 'invalid_request_error', `Unrecognized request URL (${req.method}: ${path}).`)
  }
}

const server = createServer((req, res) => {
  handle(req, res).catch((error) => {
    apiError(res, 500, 'api_error', `The test double failed: ${error.message}`)
  })
})
server.listen(config.port, '127.0.0.1', () => {
  if (process.env.PAYMENT_FAKE_VERBOSE) console.log(`payment fake on ${PAGE_BASE}`)
})
const stop = () => server.close(() => process.exit(0))
process.on('SIGTERM', stop)
process.on('SIGINT', stop)
