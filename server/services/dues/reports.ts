import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { addCalendarDays } from '#shared/utils/dates'
import { membershipStatus } from '#shared/utils/membership-status'
import { formatMoney, PAYMENT_METHOD_LABELS, PAYMENT_STATUS_LABELS } from '#shared/utils/dues-renewal'
import type { PaymentListQuery } from '#shared/schemas/dues'
import type { MonthTotalDto, PaymentDto, PaymentListDto, StandingListItemDto } from '#shared/types/dues'
import { receiptLabel } from './ledger'
import type { CsvValue } from '#shared/utils/csv'

const SORT_SQL: Record<PaymentListQuery['sort'], string> = {
  paidOn: 'p.paid_on', createdAt: 'p.created_at', amount: 'p.amount_minor', member: 'u.name', receiptNumber: 'p.receipt_number',
}

interface Row {
  id: string
  membership_id: string
  member_name: string
  plan_name: string
  method: PaymentDto['method']
  status: PaymentDto['status']
  amount_minor: number
  currency: string
  paid_on: string | null
  paid_through_before: string | null
  paid_through_after: string | null
  receipt_number: number | null
  reference: string | null
  failure_message: string | null
  created_at: Date
  refundable: boolean
  total: string
}

function where(query: Partial<PaymentListQuery> & { membershipId?: string }): string {
  return ['p.club_id = :clubId',
    query.membershipId ? 'p.membership_id = :membershipId' : '',
    query.method ? 'p.method = :method' : '',
    query.status ? 'p.status = :status' : '',
    query.planId ? 'p.plan_id = :planId' : '',
    query.from ? 'COALESCE(p.paid_on, p.created_at::date) >= :from' : '',
    query.to ? 'COALESCE(p.paid_on, p.created_at::date) <= :to' : '',
  ].filter(Boolean).join(' AND ')
}

/** The club's payments, filtered (method, status, plan, dates), sorted and paged by the server (dues.manage). */
export async function listPayments(actor: Actor, query: PaymentListQuery & { membershipId?: string }, opts: { all?: boolean } = {}): Promise<PaymentListDto> {
  const rows = await useDb().query<Row>(`
    SELECT p.id, p.membership_id, u.name AS member_name, p.plan_name, p.method, p.status, p.amount_minor, p.currency,
      p.paid_on::text AS paid_on, p.paid_through_before::text AS paid_through_before, p.paid_through_after::text AS paid_through_after,
      p.receipt_number, p.reference, p.failure_message, p.created_at,
      (p.status = 'paid' AND p.paid_through_after = m.paid_through) AS refundable,
      count(*) OVER () AS total
    FROM payments p JOIN memberships m ON m.id = p.membership_id JOIN users u ON u.id = m.user_id
    WHERE ${where(query)}
    ORDER BY ${SORT_SQL[query.sort]} ${query.dir === 'asc' ? 'ASC' : 'DESC'} NULLS LAST, p.id
    ${opts.all ? '' : 'LIMIT :limit OFFSET :offset'}`, {
    replacements: { ...query, clubId: actor.club.id, limit: query.pageSize, offset: (query.page - 1) * query.pageSize },
    type: QueryTypes.SELECT,
  })
  return {
    items: rows.map(r => ({
      id: r.id, memberId: r.membership_id, memberName: r.member_name, planName: r.plan_name, method: r.method, status: r.status,
      amountMinor: r.amount_minor, currency: r.currency, paidOn: r.paid_on, paidThroughBefore: r.paid_through_before,
      paidThroughAfter: r.paid_through_after, receiptNumber: r.receipt_number, reference: r.reference, failureMessage: r.failure_message,
      createdAt: new Date(r.created_at).toISOString(), refundable: r.refundable,
    })),
    total: Number(rows[0]?.total ?? 0),
    page: query.page,
    pageSize: query.pageSize,
  }
}

/** The payments CSV's columns. */
export const PAYMENT_CSV_HEADER = ['receipt', 'member', 'plan', 'method', 'status', 'amount', 'currency', 'paid_on', 'paid_through_before', 'paid_through_after', 'reference'] as const

/** Every payment the filters select, as CSV rows under `PAYMENT_CSV_HEADER` (the amount in the currency's units, its decimals kept). */
export async function paymentRows(actor: Actor, query: PaymentListQuery): Promise<CsvValue[][]> {
  const { items } = await listPayments(actor, query, { all: true })
  return items.map(p => [
    p.receiptNumber ? receiptLabel(p.receiptNumber) : '', p.memberName, p.planName, PAYMENT_METHOD_LABELS[p.method], PAYMENT_STATUS_LABELS[p.status],
    formatMoney(p.amountMinor, p.currency).split(' ')[1]!, p.currency, p.paidOn, p.paidThroughBefore, p.paidThroughAfter, p.reference,
  ])
}

/** Money received and refunded per calendar month (of the payment's date) and currency, newest first. */
export async function monthlyTotals(actor: Actor, months = 12): Promise<MonthTotalDto[]> {
  const rows = await useDb().query<{ month: string, currency: string, paid: string, refunded: string, count: string }>(`
    SELECT to_char(p.paid_on, 'YYYY-MM') AS month, p.currency, sum(p.amount_minor) AS paid,
      sum(CASE WHEN p.status = 'refunded' THEN p.amount_minor ELSE 0 END) AS refunded, count(*) AS count
    FROM payments p WHERE p.club_id = :clubId AND p.status IN ('paid', 'refunded') AND p.paid_on > :since
    GROUP BY 1, 2 ORDER BY 1 DESC, 2`, {
    replacements: { clubId: actor.club.id, since: addCalendarDays(clubToday(actor.club), -31 * months) }, type: QueryTypes.SELECT,
  })
  return rows.map(r => ({ month: r.month, currency: r.currency, paidMinor: Number(r.paid), refundedMinor: Number(r.refunded), count: Number(r.count) }))
}

/** Members in the grace period or lapsed (not suspended or resigned), soonest-lapsing first. */
export async function graceAndLapsed(actor: Actor): Promise<StandingListItemDto[]> {
  const today = clubToday(actor.club)
  const rows = await useDb().query<{ id: string, name: string, paid_through: string }>(`
    SELECT m.id, u.name, m.paid_through::text AS paid_through FROM memberships m JOIN users u ON u.id = m.user_id
    WHERE m.club_id = :clubId AND m.paid_through < :today AND m.suspended_at IS NULL AND m.resigned_at IS NULL
    ORDER BY m.paid_through DESC, u.name LIMIT 500`, { replacements: { clubId: actor.club.id, today }, type: QueryTypes.SELECT })
  const opts = { timeZone: actor.club.timeZone, graceDays: actor.club.graceDays }
  return rows.map(r => ({ id: r.id, name: r.name, paidThrough: r.paid_through, status: membershipStatus({ paidThrough: r.paid_through }, opts) as 'grace' | 'lapsed' }))
}

/** The signed-in member's own payments that counted (their receipts), newest first. */
export async function myReceipts(actor: Actor): Promise<PaymentDto[]> {
  const mine = await listPayments(actor, { sort: 'createdAt', dir: 'desc', page: 1, pageSize: 100, membershipId: actor.membership.id }, { all: true })
  return mine.items.filter(p => p.receiptNumber !== null)
}
