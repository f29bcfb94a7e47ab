import { describe, it, expect } from 'vitest'
import { PDFParse } from 'pdf-parse'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay } from '../../support/factories'
import { waitForMail } from '../../support/mail'
import { CARDS, eventually, paidThroughOf, payOnPage, payer, paymentsOf, planId, startCheckout } from './support'
import { parseCsv } from '../../support/csv'

function plusMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const last = new Date(Date.UTC(y, m - 1 + months + 1, 0)).getUTCDate()
  return new Date(Date.UTC(y, m - 1 + months, Math.min(d, last))).toISOString().slice(0, 10)
}

const offline = (body: Record<string, unknown>) => api('/api/dues/payments', { as: 'admin', body })

describe('offline payments', () => {
  it('a cash payment renews like a card payment, is receipted and audited', async () => {
    const m = await payer({ paidDays: -45 })
    const res = await offline({ memberId: m.memberId, planId: await planId('adult'), method: 'cash', amountMinor: 6000, paidOn: clubDay(-1), reference: 'Envelope 12' })
    expect(res.status).toBe(200)
    expect(res.body.paidThrough).toBe(plusMonths(clubDay(-1), 12))
    expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(-1), 12))
    const [audit] = await sql<{ action: string }>(`SELECT action FROM audit_events WHERE subject_id = $1`, [res.body.paymentId])
    expect(audit!.action).toBe('dues.offline_payment')
    await waitForMail(m.email, /receipt R-\d{6}/)
  })

  it('refuses a future date, a suspended member and a plan not open to their age', async () => {
    const m = await payer({ paidDays: -45 })
    const adult = await planId('adult')
    expect((await offline({ memberId: m.memberId, planId: adult, method: 'transfer', amountMinor: 6000, paidOn: clubDay(2) })).status).toBe(422)
    expect((await offline({ memberId: m.memberId, planId: await planId('junior'), method: 'transfer', amountMinor: 2500, paidOn: clubDay(0) })).status).toBe(422)
    const s = await payer({ suspendedReason: 'Test' })
    expect((await offline({ memberId: s.memberId, planId: adult, method: 'cash', amountMinor: 6000, paidOn: clubDay(0) })).body.data.reasons[0].code).toBe('SUSPENDED')
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(-45))
  })

  it('receipt numbers are unique and sequential in the club, even for payments recorded at once', async () => {
    const members = await Promise.all([1, 2, 3, 4].map(() => payer({ paidDays: -5 })))
    const adult = await planId('adult')
    const answers = await Promise.all(members.map(m => offline({ memberId: m.memberId, planId: adult, method: 'transfer', amountMinor: 6000, paidOn: clubDay(0) })))
    expect(answers.every(a => a.status === 200)).toBe(true)
    const numbers = (await sql<{ receipt_number: number }>(`SELECT receipt_number FROM payments WHERE id = ANY ($1::uuid[]) ORDER BY receipt_number`, [answers.map(a => a.body.paymentId)])).map(r => r.receipt_number)
    expect(new Set(numbers).size).toBe(4)
    const [club] = await sql<{ next: number }>(`SELECT next_receipt_number AS next FROM clubs WHERE tag_prefix = 'SRG'`)
    expect(Math.max(...numbers)).toBeLessThan(club!.next)
  })
})

describe('refunds', () => {
  it('refunding a cash payment returns paid-through to the date it replaced; the member is told; audited', async () => {
    const m = await payer({ paidDays: 15 })
    const paid = await offline({ memberId: m.memberId, planId: await planId('student'), method: 'cash', amountMinor: 3500, paidOn: clubDay(0) })
    expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(15), 12))
    expect((await api(`/api/dues/payments/${paid.body.paymentId}/refund`, { as: 'admin', body: {} })).status).toBe(400) // not confirmed
    const res = await api(`/api/dues/payments/${paid.body.paymentId}/refund`, { as: 'admin', body: { confirm: true, note: 'Paid back in cash' } })
    expect(res.status).toBe(200)
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(15))
    await waitForMail(m.email, /was refunded/)
    const [audit] = await sql<{ action: string }>(`SELECT action FROM audit_events WHERE subject_id = $1 AND action = 'dues.refund'`, [paid.body.paymentId])
    expect(audit).toBeDefined()
    expect((await api(`/api/dues/payments/${paid.body.paymentId}/refund`, { as: 'admin', body: { confirm: true } })).status).toBe(422)
  })

  it('a card payment is refunded through the SDK; only the latest payment may be refunded', async () => {
    const m = await payer({ paidDays: -60 })
    const started = await startCheckout(m, await planId('adult'))
    await payOnPage(started.body.url, CARDS.success)
    await eventually(async () => (await paymentsOf(m.memberId))[0]?.status === 'paid')
    const later = await offline({ memberId: m.memberId, planId: await planId('adult'), method: 'transfer', amountMinor: 6000, paidOn: clubDay(0) })
    const older = await api(`/api/dues/payments/${started.body.paymentId}/refund`, { as: 'admin', body: { confirm: true } })
    expect(older.body.data.reasons[0].code).toBe('REFUND_NOT_LATEST')
    expect((await api(`/api/dues/payments/${later.body.paymentId}/refund`, { as: 'admin', body: { confirm: true } })).status).toBe(200)
    expect(await paidThroughOf(m.memberId)).toBe(plusMonths(clubDay(0), 12))
    const card = await api(`/api/dues/payments/${started.body.paymentId}/refund`, { as: 'admin', body: { confirm: true } })
    expect(card.status).toBe(200)
    // Back to the lapsed date the card payment replaced.
    expect(await paidThroughOf(m.memberId)).toBe(clubDay(-60))
    const [refund] = await sql<{ provider_refund_id: string }>(`SELECT provider_refund_id FROM refunds WHERE payment_id = $1`, [started.body.paymentId])
    expect(refund!.provider_refund_id).toMatch(/^re_/)
  })
})

describe('receipts', () => {
  it('the member downloads their receipt as a PDF carrying club, member, plan, period, amount, method and number; others get 404', async () => {
    const m = await payer({ paidDays: -45 })
    const paid = await offline({ memberId: m.memberId, planId: await planId('adult'), method: 'transfer', amountMinor: 6000, paidOn: clubDay(0), reference: 'TR-1' })
    const list = await api('/api/dues/receipts', { as: m.cookie })
    expect(list.body.items.map((p: { id: string }) => p.id)).toEqual([paid.body.paymentId])
    const res = await fetch(new URL(`/api/dues/receipts/${paid.body.paymentId}/pdf`, (await import('vitest')).inject('baseUrl')), { headers: { cookie: m.cookie } })
    expect(res.headers.get('content-type')).toBe('application/pdf')
    const parser = new PDFParse({ data: new Uint8Array(await res.arrayBuffer()) })
    const { text } = await parser.getText()
    await parser.destroy()
    const receipt = (await api(`/api/dues/receipts/${paid.body.paymentId}`, { as: m.cookie })).body
    for (const part of [receipt.clubName, m.name, 'Adult', 'EUR 60.00', 'Bank transfer', receipt.receiptLabel]) expect(text).toContain(part)
    expect(receipt.periodThrough).toBe(plusMonths(clubDay(0), 12))
    const other = await payer()
    expect((await api(`/api/dues/receipts/${paid.body.paymentId}`, { as: other.cookie })).status).toBe(404)
  })
})

describe('the payments table', () => {
  it('filters by method, status, plan and date; the CSV export parses back to the same rows', async () => {
    const m = await payer({ paidDays: -45 })
    const tag = m.name.split(' ').pop()!
    const student = await planId('student')
    await offline({ memberId: m.memberId, planId: student, method: 'cash', amountMinor: 3500, paidOn: clubDay(-3), reference: `"=cash", ${tag}` })
    const second = await offline({ memberId: m.memberId, planId: student, method: 'transfer', amountMinor: 3500, paidOn: clubDay(0) })
    await api(`/api/dues/payments/${second.body.paymentId}/refund`, { as: 'admin', body: { confirm: true } })

    const base = { planId: student, from: clubDay(-3), to: clubDay(0), pageSize: 100 }
    const cash = await api('/api/dues/payments', { as: 'admin', query: { ...base, method: 'cash' } })
    expect(cash.body.items.filter((p: { memberId: string }) => p.memberId === m.memberId).map((p: { method: string }) => p.method)).toEqual(['cash'])
    expect(cash.body.items.every((p: { method: string, planName: string }) => p.method === 'cash' && p.planName === 'Student')).toBe(true)
    const refunded = await api('/api/dues/payments', { as: 'admin', query: { ...base, status: 'refunded' } })
    expect(refunded.body.items.some((p: { id: string }) => p.id === second.body.paymentId)).toBe(true)
    expect(refunded.body.items.every((p: { status: string }) => p.status === 'refunded')).toBe(true)
    const old = await api('/api/dues/payments', { as: 'admin', query: { ...base, from: clubDay(-2) } })
    expect(old.body.items.some((p: { method: string, memberId: string }) => p.memberId === m.memberId && p.method === 'cash')).toBe(false)

    const csv = await fetch(new URL(`/api/dues/payments/export?${new URLSearchParams({ planId: student, from: clubDay(-3), to: clubDay(0) })}`, (await import('vitest')).inject('baseUrl')), { headers: { cookie: (await import('vitest')).inject('cookies').admin } })
    expect(csv.headers.get('content-type')).toMatch(/^text\/csv/)
    const rows = parseCsv(await csv.text())
    expect(rows[0]).toEqual(['receipt', 'member', 'plan', 'method', 'status', 'amount', 'currency', 'paid_on', 'paid_through_before', 'paid_through_after', 'reference'])
    const mine = rows.filter(r => r[1] === m.name)
    expect(mine.map(r => [r[3], r[4], r[5], r[6], r[7]]).sort()).toEqual([
      ['Bank transfer', 'Refunded', '35.00', 'EUR', clubDay(0)],
      ['Cash', 'Paid', '35.00', 'EUR', clubDay(-3)],
    ])
    // Quotes and commas survive; a leading "=" is defused.
    expect(mine.find(r => r[3] === 'Cash')![10]).toBe(`"=cash", ${tag}`)
    const all = await api('/api/dues/payments', { as: 'admin', query: { planId: student, from: clubDay(-3), to: clubDay(0), pageSize: 100 } })
    expect(rows.length - 1).toBe(all.body.total)
  })

  it('lists who is in grace or lapsed, and totals per month', async () => {
    const grace = await payer({ paidDays: -3 })
    const lapsed = await payer({ paidDays: -90 })
    const list = (await api('/api/dues/overdue', { as: 'admin' })).body.items
    expect(list.find((i: { id: string }) => i.id === grace.memberId)?.status).toBe('grace')
    expect(list.find((i: { id: string }) => i.id === lapsed.memberId)?.status).toBe('lapsed')
    const totals = (await api('/api/dues/totals', { as: 'admin' })).body.items
    const month = clubDay(0).slice(0, 7)
    expect(totals.find((t: { month: string, currency: string }) => t.month === month && t.currency === 'EUR')?.paidMinor).toBeGreaterThan(0)
  })
})

describe('dues reminders', () => {
  const kindsOf = async (memberId: string) => (await sql<{ kind: string, due_on: string }>(
    `SELECT kind, due_on::text AS due_on FROM notices WHERE membership_id = $1 AND kind LIKE 'dues_%' ORDER BY kind`, [memberId]))

  it('30 and 7 days before, the first grace day and the lapse day: each once, even when the job runs twice at once', async () => {
    const week = await payer({ paidDays: 7 })
    const graceDay = await payer({ paidDays: -1 })
    const lapseDay = await payer({ paidDays: -31 }) // the demo club's grace period is 30 days
    const optedOut = await payer({ paidDays: -1, noticeOptOuts: ['dues_grace'] })
    const run = () => api('/api/outbox/run', { method: 'POST', as: 'admin' })
    await Promise.all([run(), run()])
    await run()
    expect(await kindsOf(week.memberId)).toEqual([
      { kind: 'dues_reminder', due_on: clubDay(-23) },
      { kind: 'dues_reminder_week', due_on: clubDay(0) },
    ])
    expect(await kindsOf(graceDay.memberId)).toEqual([{ kind: 'dues_grace', due_on: clubDay(0) }])
    expect(await kindsOf(lapseDay.memberId)).toEqual([{ kind: 'dues_lapsed', due_on: clubDay(0) }])
    expect(await kindsOf(optedOut.memberId)).toEqual([])
    const mail = await waitForMail(graceDay.email, /grace period/)
    expect(mail.text).toMatch(/\/dues\/renew/)
    expect(mail.html).toContain('/dues/renew')
    expect(mail.text).toContain('tier')
  })
})

describe('plans', () => {
  it('the admin sets the plan a member renews on and edits a plan; both audited; a member may not', async () => {
    const m = await payer()
    const student = await planId('student')
    expect((await api(`/api/dues/members/${m.memberId}/plan`, { as: m.cookie, method: 'PUT', body: { planId: student } })).status).toBe(403)
    expect((await api(`/api/dues/members/${m.memberId}/plan`, { as: 'admin', method: 'PUT', body: { planId: student } })).status).toBe(200)
    expect((await api('/api/dues/renewal', { as: m.cookie })).body.currentPlanId).toBe(student)
    const [audit] = await sql<{ action: string }>(`SELECT action FROM audit_events WHERE subject_id = $1 AND action = 'dues.member_plan'`, [m.memberId])
    expect(audit).toBeDefined()

    const plans = (await api('/api/dues/plans', { as: 'admin' })).body.items as { id: string, code: string, name: string, priceMinor: number, currency: string, periodMonths: number }[]
    const s = plans.find(p => p.code === 'student')!
    const edited = await api(`/api/dues/plans/${s.id}`, { as: 'admin', method: 'PUT', body: { name: s.name, priceMinor: s.priceMinor + 100, currency: 'eur', periodMonths: s.periodMonths } })
    expect(edited.status).toBe(200)
    expect(edited.body.items.find((p: { code: string }) => p.code === 'student').priceMinor).toBe(s.priceMinor + 100)
    await api(`/api/dues/plans/${s.id}`, { as: 'admin', method: 'PUT', body: { name: s.name, priceMinor: s.priceMinor, currency: s.currency, periodMonths: s.periodMonths } })
    expect((await api(`/api/dues/plans/${s.id}`, { as: 'admin', method: 'PUT', body: { name: 'Adult', priceMinor: 100, currency: 'EUR', periodMonths: 12 } })).status).toBe(409)
  })
})

describe('demo data', () => {
  it('the demo club has payment histories by card, cash and transfer, members in grace and lapsed with theirs, and one refund', async () => {
    const rows = await sql<{ method: string, status: string, n: string }>(`SELECT p.method, p.status, count(*) AS n FROM payments p JOIN clubs c ON c.id = p.club_id
      JOIN memberships m ON m.id = p.membership_id JOIN users u ON u.id = m.user_id
      WHERE c.tag_prefix = 'SRG' AND u.email LIKE '%hoopwise.example' AND u.email NOT LIKE '%test.hoopwise.example' GROUP BY 1, 2`)
    for (const method of ['card', 'cash', 'transfer']) expect(rows.some(r => r.method === method && r.status === 'paid')).toBe(true)
    expect(rows.filter(r => r.status === 'refunded').reduce((n, r) => n + Number(r.n), 0)).toBe(1)
    const overdue = (await api('/api/dues/overdue', { as: 'admin' })).body.items as { id: string, status: string }[]
    const withPayments = await sql<{ id: string }>(`SELECT DISTINCT membership_id AS id FROM payments`)
    const paid = new Set(withPayments.map(r => r.id))
    expect(overdue.some(i => i.status === 'grace' && paid.has(i.id))).toBe(true)
    expect(overdue.some(i => i.status === 'lapsed' && paid.has(i.id))).toBe(true)
  })
})
