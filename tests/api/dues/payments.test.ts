import { describe, it, expect } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay } from '../../support/factories'
import { waitForMail } from '../../support/mail'
import { testEnv } from '../../support/test-env'
import { CARDS, deliver, event, eventually, paidThroughOf, payOnPage, payer, paymentsOf, planId, signatureHeader, startCheckout } from './support'

/** Adds calendar months the plain way (a check independent of the app's helper), clamping the day. */
function plusMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const last = new Date(Date.UTC(y, m - 1 + months + 1, 0)).getUTCDate()
  return new Date(Date.UTC(y, m - 1 + months, Math.min(d, last))).toISOString().slice(0, 10)
}

describe('card renewal through the SDK and the payment fake', () => {
  it('a lapsed member pays with the success card: one year from today, a receipt, the return state applied', async () => {
    const m = await payer({ paidDays: -60 })
    const started = await startCheckout(m, await planId('adult'))
    expect(started.status).toBe(200)
    expect(started.body.url).toMatch(new RegExp(`^${testEnv.paymentFakeUrl}/pay/cs_test_`))
    const page = await fetch(started.body.url)
    expect(await page.text()).toContain('TEST DOUBLE')

    const paid = await payOnPage(started.body.url, CARDS.success)
    expect(paid.status).toBe(303)
    expect(paid.location).toBe(`${testEnv.baseUrl}/dues/return?payment=${started.body.paymentId}`)

    const state = await eventually(async () => {
      const r = await api(`/api/dues/checkout/${started.body.paymentId}`, { as: m.cookie })
      return r.body.status === 'paid' && r.body
    })
    expect(state.paidThrough).toBe(plusMonths(clubDay(0), 12))
    expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(0), 12))
    const [p] = await paymentsOf(m.memberId)
    expect(p).toEqual(expect.objectContaining({ status: 'paid', method: 'card', paid_on: clubDay(0), paid_through_before: clubDay(-60) }))
    expect(p!.receipt_number).toBeGreaterThan(0)
    const mail = await waitForMail(m.email, /receipt R-\d{6}/)
    expect(mail.text).toContain('Receipt number R-')
    expect(mail.html).toContain('<!doctype html>')
  })

  it('an early renewal extends from the old paid-through date', async () => {
    const m = await payer({ paidDays: 20 })
    const started = await startCheckout(m, await planId('student'))
    await payOnPage(started.body.url, CARDS.success)
    await eventually(async () => (await paymentsOf(m.memberId))[0]?.status === 'paid')
    expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(20), 12))
  })

  it.each([
    ['generic decline', CARDS.generic, 'Your card was declined.'],
    ['insufficient funds', CARDS.insufficient, 'Your card has insufficient funds.'],
    ['expired card', CARDS.expired, 'Your card has expired.'],
    ['incorrect CVC', CARDS.cvc, 'Your card\'s security code is incorrect.'],
  ])('%s: the page shows the decline, nothing is renewed, the reason reaches the return page', async (_l, card, message) => {
    const m = await payer({ paidDays: -60 })
    const started = await startCheckout(m, await planId('adult'))
    const tried = await payOnPage(started.body.url, card)
    expect(tried.status).toBe(402)
    expect(tried.html).toContain(message.replace('\'', '&#39;'))
    const state = await eventually(async () => {
      const r = await api(`/api/dues/checkout/${started.body.paymentId}`, { as: m.cookie })
      return r.body.status === 'failed' && r.body
    })
    expect(state.failureMessage).toBe(message)
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(-60))
    // The member may try another card on the same page.
    expect((await payOnPage(started.body.url, CARDS.success)).status).toBe(303)
    await eventually(async () => (await paymentsOf(m.memberId))[0]?.status === 'paid')
  })

  it('a checkout that expires unpaid is marked so and changes nothing', async () => {
    const m = await payer({ paidDays: -60 })
    const started = await startCheckout(m, await planId('adult'))
    const [p] = await paymentsOf(m.memberId)
    // Expired at the payment service (as after 24 hours), through its API with the secret key.
    const res = await fetch(`${testEnv.paymentFakeUrl}/v1/checkout/sessions/${p!.provider_checkout_id}/expire`, { method: 'POST', headers: { authorization: `Bearer ${testEnv.paymentKeys.secretKey}` } })
    expect(res.status).toBe(200)
    await eventually(async () => (await api(`/api/dues/checkout/${started.body.paymentId}`, { as: m.cookie })).body.status === 'expired')
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(-60))
    // The fake checks the key like the real service.
    const wrongKey = await fetch(`${testEnv.paymentFakeUrl}/v1/checkout/sessions/${p!.provider_checkout_id}`, { headers: { authorization: 'Bearer sk_test_wrong' } })
    expect(wrongKey.status).toBe(401)
    expect((await wrongKey.json()).error.type).toBe('invalid_request_error')
  })

  it('a number failing the Luhn check is refused on the page and goes nowhere', async () => {
    const m = await payer({ paidDays: -60 })
    const started = await startCheckout(m, await planId('adult'))
    const tried = await payOnPage(started.body.url, CARDS.luhnFails)
    expect(tried.status).toBe(400)
    expect(tried.html).toContain('Your card number is invalid.')
    await new Promise(r => setTimeout(r, 500))
    expect((await paymentsOf(m.memberId))[0]!.status).toBe('pending')
  })

  it('refuses a member awaiting approval, a suspended and a resigned member, with the reason', async () => {
    const adult = await planId('adult')
    for (const [overrides, code] of [
      [{ paidDays: null, approved: false }, 'AWAITING_APPROVAL'],
      [{ suspendedReason: 'Test' }, 'SUSPENDED'],
      [{ resigned: true }, 'RESIGNED'],
    ] as const) {
      const m = await payer(overrides)
      const res = await startCheckout(m, adult)
      expect(res.status).toBe(422)
      expect(res.body.data.reasons.map((r: { code: string }) => r.code)).toEqual([code])
    }
    const approved = await payer({ paidDays: null })
    expect((await startCheckout(approved, adult)).status).toBe(200)
  })

  it('a junior pays Junior; an adult chooses Adult or Student but not Junior', async () => {
    const junior = await payer({ birthDate: clubDay(-15 * 365), guardianConsent: true })
    expect((await startCheckout(junior, await planId('adult'))).body.data.reasons[0].code).toBe('PLAN_JUNIOR_ONLY')
    expect((await startCheckout(junior, await planId('junior'))).status).toBe(200)
    const adult = await payer()
    expect((await startCheckout(adult, await planId('junior'))).status).toBe(422)
    const options = await api('/api/dues/renewal', { as: adult.cookie })
    expect(options.body.plans.map((p: { code: string }) => p.code).sort()).toEqual(['adult', 'student'])
  })
})

describe('the webhook', () => {
  it('a forged or stale signature is refused with 400 and changes nothing', async () => {
    const m = await payer({ paidDays: -60 })
    const started = await startCheckout(m, await planId('adult'))
    const [p] = await paymentsOf(m.memberId)
    const completed = event('checkout.session.completed', { id: p!.provider_checkout_id, object: 'checkout.session', payment_status: 'paid', status: 'complete', payment_intent: p!.provider_payment_intent_id })
    const payload = JSON.stringify(completed)
    expect((await deliver(completed, signatureHeader(payload, 'whsec_forged'))).status).toBe(400)
    expect((await deliver(completed, signatureHeader(payload, undefined, Math.floor(Date.now() / 1000) - 301))).status).toBe(400)
    expect((await deliver(completed, 'nonsense')).status).toBe(400)
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(-60))
    expect(await sql('SELECT 1 FROM payment_events WHERE id = $1', [completed.id])).toEqual([])
    expect(started.status).toBe(200)
    // The same event, signed right, is applied.
    expect((await deliver(completed)).body.outcome).toBe('applied')
  })

  it('the same event delivered 20 times extends once', async () => {
    const m = await payer({ paidDays: -60 })
    await startCheckout(m, await planId('adult'))
    const [p] = await paymentsOf(m.memberId)
    const completed = event('checkout.session.completed', { id: p!.provider_checkout_id, object: 'checkout.session', payment_status: 'paid', status: 'complete', payment_intent: p!.provider_payment_intent_id })
    const answers = await Promise.all(Array.from({ length: 20 }, () => deliver(completed)))
    expect(answers.every(a => a.status === 200)).toBe(true)
    expect(answers.filter(a => a.body.outcome === 'applied')).toHaveLength(1)
    expect(answers.filter(a => a.body.outcome === 'replay')).toHaveLength(19)
    expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(0), 12))
  })

  it('a refund event before the completion it refunds is held, then applied after it', async () => {
    const m = await payer({ paidDays: 10 })
    await startCheckout(m, await planId('adult'))
    const [p] = await paymentsOf(m.memberId)
    const intent = p!.provider_payment_intent_id!
    const refund = event('refund.updated', { id: `re_${m.memberId.slice(0, 8)}`, object: 'refund', status: 'succeeded', payment_intent: intent, amount: 6000, currency: 'eur' })
    expect((await deliver(refund)).body.outcome).toBe('held')
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(10))
    const completed = event('checkout.session.completed', { id: p!.provider_checkout_id, object: 'checkout.session', payment_status: 'paid', status: 'complete', payment_intent: intent })
    expect((await deliver(completed)).body.outcome).toBe('applied')
    // Counted, then refunded at once: paid-through is back where it was.
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(10))
    expect((await paymentsOf(m.memberId))[0]).toEqual(expect.objectContaining({ status: 'refunded', paid_through_after: plusMonths(clubDay(10), 12) }))
    const [row] = await sql<{ status: string }>('SELECT status FROM payment_events WHERE id = $1', [refund.id])
    expect(row!.status).toBe('applied')
  })

  it.each([
    ['malformed JSON', '{"id": '],
    ['a JSON array', '[1, 2, 3]'],
    ['an empty body', ''],
  ])('%s, even signed, is refused with 400 and stores nothing', async (_l, body) => {
    const before = await sql('SELECT count(*) FROM payment_events')
    const res = await fetch(new URL('/api/dues/webhook', testEnv.baseUrl), { method: 'POST', body, headers: { 'content-type': 'application/json', 'stripe-signature': signatureHeader(body) } })
    expect(res.status).toBeGreaterThanOrEqual(400)
    expect(res.status).toBeLessThan(500)
    expect(await sql('SELECT count(*) FROM payment_events')).toEqual(before)
  })

  it('other event types are acknowledged and ignored', async () => {
    const res = await deliver(event('customer.created', { id: 'cus_x', object: 'customer' }))
    expect(res).toEqual({ status: 200, body: { received: true, outcome: 'ignored' } })
  })

  it('the app not answering: the fake retries until it does, and the payment is applied once', async () => {
    const { createServer } = await import('node:http')
    const { TEST } = await import('../../../scripts/lib/config.mjs')
    const port = TEST.spareBase + 10
    let refusals = 0
    const attempts: string[] = []
    // A stand-in for an app that is down for its first three deliveries, then forwards to the real one.
    const proxy = createServer(async (req, res) => {
      const chunks: Buffer[] = []
      for await (const c of req) chunks.push(c as Buffer)
      const body = Buffer.concat(chunks).toString()
      attempts.push(JSON.parse(body).id)
      if (refusals < 3) {
        refusals += 1
        res.writeHead(503).end()
        return
      }
      const forwarded = await fetch(`${testEnv.baseUrl}/api/dues/webhook`, { method: 'POST', body, headers: { 'content-type': 'application/json', 'stripe-signature': String(req.headers['stripe-signature']) } })
      res.writeHead(forwarded.status).end(await forwarded.text())
    })
    await new Promise<void>(r => proxy.listen(port, '127.0.0.1', r))
    const point = (url: string) => fetch(`${testEnv.paymentFakeUrl}/_fake/webhook`, { method: 'POST', body: JSON.stringify({ url }) })
    try {
      await point(`http://127.0.0.1:${port}/api/dues/webhook`)
      const m = await payer({ paidDays: -60 })
      const started = await startCheckout(m, await planId('adult'))
      await payOnPage(started.body.url, CARDS.success)
      await eventually(async () => (await paymentsOf(m.memberId))[0]?.status === 'paid', 30_000)
      expect(refusals).toBe(3)
      expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(0), 12))
      const [events] = await sql<{ count: string }>(`SELECT count(*) FROM payment_events WHERE type = 'checkout.session.completed' AND payload->'data'->'object'->>'id' = $1`, [(await paymentsOf(m.memberId))[0]!.provider_checkout_id])
      expect(Number(events!.count)).toBe(1)
    }
    finally {
      await point(`${testEnv.baseUrl}/api/dues/webhook`)
      await new Promise(r => proxy.close(r))
    }
    expect(attempts.length).toBeGreaterThan(3)
  })
})
