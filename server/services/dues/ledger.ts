import { QueryTypes, type Transaction } from 'sequelize'
import { Club, type Membership } from '../../models'
import { lockMemberships, lockPayment, takeReceiptNumber } from '../../utils/locks'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice } from '../notices'
import { formatMoney, paidThroughAfterRefund, periodStartsOn, renewedPaidThrough, PAYMENT_METHOD_LABELS, type PaymentMethod, type PaymentStatus } from '#shared/utils/dues-renewal'

/** A payments row as the dues services read it. */
export interface PaymentRow {
  id: string
  club_id: string
  membership_id: string
  plan_id: string
  plan_name: string
  method: PaymentMethod
  status: PaymentStatus
  amount_minor: number
  currency: string
  period_months: number
  paid_on: string | null
  paid_through_before: string | null
  paid_through_after: string | null
  receipt_number: number | null
  provider_payment_intent_id: string | null
  provider_checkout_id: string | null
}

const PAYMENT_COLUMNS = `id, club_id, membership_id, plan_id, plan_name, method, status, amount_minor, currency, period_months,
  paid_on::text AS paid_on, paid_through_before::text AS paid_through_before, paid_through_after::text AS paid_through_after,
  receipt_number, provider_payment_intent_id, provider_checkout_id`

/** One payment by a column that identifies it (id, checkout id, payment intent id), or undefined. */
export async function findPayment(by: 'id' | 'provider_checkout_id' | 'provider_payment_intent_id', value: string, transaction?: Transaction): Promise<PaymentRow | undefined> {
  const [row] = await useDb().query<PaymentRow>(`SELECT ${PAYMENT_COLUMNS} FROM payments WHERE ${by} = :value`,
    { replacements: { value }, type: QueryTypes.SELECT, transaction })
  return row
}

/** "R-000042": a receipt number as printed. */
export function receiptLabel(n: number): string {
  return `R-${String(n).padStart(6, '0')}`
}

interface Addressee { email: string, name: string, notice_opt_outs: string[] }
async function addressee(membershipId: string, transaction: Transaction): Promise<Addressee> {
  const [row] = await useDb().query<Addressee>(
    'SELECT u.email, u.name, m.notice_opt_outs FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = :id',
    { replacements: { id: membershipId }, type: QueryTypes.SELECT, transaction })
  return row!
}

/**
 * Counts payment `paymentId` (pending, or failed before a later try succeeded) as paid at instant
 * `paidAt`: inside `transaction`, locks the membership then the payment, extends paid-through by the
 * plan's period from the later of the payment's date in the club's time zone and the current
 * paid-through date, records both dates and the next receipt number, and queues the receipt e-mail.
 * Returns the new paid-through date, or null when the payment was already counted (nothing changes).
 */
export async function settlePayment(paymentId: string, paidAt: Date, transaction: Transaction, extra: { paymentIntentId?: string | null } = {}): Promise<string | null> {
  const found = await findPayment('id', paymentId, transaction)
  if (!found) return null
  const membership = (await lockMemberships([found.membership_id], transaction)).get(found.membership_id)!
  await lockPayment(paymentId, transaction)
  const payment = (await findPayment('id', paymentId, transaction))!
  if (payment.status === 'paid' || payment.status === 'refunded') return null
  const club = (await Club.findByPk(payment.club_id, { transaction }))!
  const paidOn = clubToday(club, paidAt)
  const renewal = await renew(membership, club, payment, paidOn, transaction)
  await useDb().query(`
    UPDATE payments SET status = 'paid', paid_on = :paidOn, paid_through_before = :before, paid_through_after = :after,
      receipt_number = :receipt, provider_payment_intent_id = COALESCE(:intent, provider_payment_intent_id),
      failure_code = NULL, failure_message = NULL, updated_at = now()
    WHERE id = :id`, {
    replacements: { id: paymentId, paidOn, ...renewal, intent: extra.paymentIntentId ?? null },
    transaction,
  })
  await queueReceipt(club, membership.id, { ...payment, id: paymentId, paid_on: paidOn, paid_through_before: renewal.before, paid_through_after: renewal.after, receipt_number: renewal.receipt }, transaction)
  return renewal.after
}

/**
 * Renews `membership` (locked by the caller) for a payment on `plan` made on `paidOn`: paid-through
 * moves one period on (renewedPaidThrough), the member keeps that plan, and the club's next receipt
 * number is taken (step 5 of the lock order). Returns the dates and the number for the payment row.
 */
export async function renew(membership: Membership, club: Club, plan: { plan_id: string, period_months: number }, paidOn: string, transaction: Transaction): Promise<{ before: string | null, after: string, receipt: number }> {
  const before = membership.paidThrough
  const after = renewedPaidThrough(before, paidOn, plan.period_months)
  const receipt = await takeReceiptNumber(club.id, transaction)
  await membership.update({ paidThrough: after, duesPlanId: plan.plan_id }, { transaction })
  return { before, after, receipt }
}

/** Queues the receipt e-mail of counted payment `p` to the member, inside `transaction`. */
export async function queueReceipt(club: Club, membershipId: string, p: Pick<PaymentRow, 'id' | 'plan_name' | 'amount_minor' | 'currency' | 'method' | 'paid_on' | 'paid_through_before' | 'paid_through_after' | 'receipt_number'>, transaction: Transaction): Promise<void> {
  const to = await addressee(membershipId, transaction)
  await enqueueNotice({
    clubId: club.id,
    membershipId,
    kind: 'payment_receipt',
    subjectKey: p.id,
    dueOn: clubToday(club),
    toEmail: to.email,
    vars: {
      clubName: club.name, memberName: to.name, baseUrl: clubBaseUrl(club), receiptNumber: receiptLabel(p.receipt_number!),
      planName: p.plan_name, periodFrom: periodStartsOn(p.paid_through_before, p.paid_on!), paidThrough: p.paid_through_after!,
      amount: formatMoney(p.amount_minor, p.currency), method: PAYMENT_METHOD_LABELS[p.method], paidOn: p.paid_on!, paymentId: p.id,
    },
  }, transaction)
}

/**
 * Refunds payment `paymentId` in full inside `transaction` (membership locked, then the payment): the
 * payment becomes refunded, a refund row records it, and — when it is still the membership's latest
 * payment — paid-through returns to the date it replaced and the member is told. Returns the refund,
 * or null when the payment is already refunded. Throws REFUND_NOT_LATEST when `latestOnly` and a
 * later payment moved paid-through since; the webhook (a refund made elsewhere) records it anyway.
 */
export async function refundPayment(paymentId: string, transaction: Transaction, opts: {
  latestOnly: boolean
  providerRefundId?: string | null
  recordedBy?: string | null
  note?: string | null
  now?: Date
}): Promise<{ restored: string | null, changedPaidThrough: boolean } | null> {
  const found = await findPayment('id', paymentId, transaction)
  if (!found) return null
  const membership = (await lockMemberships([found.membership_id], transaction)).get(found.membership_id)!
  await lockPayment(paymentId, transaction)
  const payment = (await findPayment('id', paymentId, transaction))!
  if (payment.status === 'refunded') return null
  if (payment.status !== 'paid') refuse({ code: 'NOT_PAID', message: 'Only a payment that was received can be refunded.' })
  const outcome = paidThroughAfterRefund({ before: payment.paid_through_before, after: payment.paid_through_after! }, membership.paidThrough)
  if (!outcome && opts.latestOnly) {
    refuse({ code: 'REFUND_NOT_LATEST', message: 'Only the latest payment of a membership can be refunded (in full); older payments and partial refunds are out of scope.' })
  }
  const club = (await Club.findByPk(payment.club_id, { transaction }))!
  const today = clubToday(club, opts.now)
  await useDb().query(`UPDATE payments SET status = 'refunded', updated_at = now() WHERE id = :id`, { replacements: { id: paymentId }, transaction })
  await useDb().query(`
    INSERT INTO refunds (club_id, payment_id, membership_id, amount_minor, currency, refunded_on, paid_through_restored,
      provider_refund_id, note, recorded_by_membership_id)
    VALUES (:clubId, :paymentId, :membershipId, :amount, :currency, :today, :restored, :providerRefundId, :note, :recordedBy)`, {
    replacements: {
      clubId: club.id, paymentId, membershipId: membership.id, amount: payment.amount_minor, currency: payment.currency, today,
      restored: outcome ? outcome.restored : membership.paidThrough, providerRefundId: opts.providerRefundId ?? null,
      note: opts.note ?? null, recordedBy: opts.recordedBy ?? null,
    },
    transaction,
  })
  if (outcome) await membership.update({ paidThrough: outcome.restored }, { transaction })
  const to = await addressee(membership.id, transaction)
  await enqueueNotice({
    clubId: club.id,
    membershipId: membership.id,
    kind: 'refund_confirmation',
    subjectKey: paymentId,
    dueOn: today,
    toEmail: to.email,
    vars: {
      clubName: club.name, memberName: to.name, baseUrl: clubBaseUrl(club), receiptNumber: receiptLabel(payment.receipt_number!),
      amount: formatMoney(payment.amount_minor, payment.currency), method: PAYMENT_METHOD_LABELS[payment.method],
      paidThrough: outcome ? (outcome.restored ?? '') : (membership.paidThrough ?? ''),
    },
  }, transaction)
  return { restored: outcome ? outcome.restored : membership.paidThrough, changedPaidThrough: !!outcome }
}
