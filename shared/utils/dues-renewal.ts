/**
 * THE dues arithmetic and rules: how a payment extends paid-through, what a refund restores, who may
 * pay and which plans they may choose. Pure functions; calendar dates are YYYY-MM-DD in the club's
 * time zone. The membership status itself comes only from `membershipStatus`.
 */
import { addCalendarDays, addCalendarMonths } from './dates'
import { isJunior, type MembershipStatus } from './membership-status'

/**
 * The paid-through date a payment made on `paidOn` sets: one period of `periodMonths` calendar months
 * from the later of the payment's date and the current paid-through date (`current`, null if never
 * paid). An early renewal keeps the days already paid for; a late one starts on the payment's date.
 * Month ends clamp: 29 February + 12 months = 28 February.
 */
export function renewedPaidThrough(current: string | null, paidOn: string, periodMonths: number): string {
  const from = current && current > paidOn ? current : paidOn
  return addCalendarMonths(from, periodMonths)
}

/**
 * The first day a payment made on `paidOn` pays for, when the membership was paid through `before`:
 * the day after `before` for an early renewal, the payment's own date otherwise. (Receipts print
 * "from … through the new paid-through date".)
 */
export function periodStartsOn(before: string | null, paidOn: string): string {
  return before && before >= paidOn ? addCalendarDays(before, 1) : paidOn
}

/**
 * The paid-through date after a full refund of the payment that moved it from `before` to `after`,
 * when the membership is now paid through `now`: the date the payment replaced. Only the latest
 * payment may be refunded, so `now` must still be the date that payment set (else null: refused).
 */
export function paidThroughAfterRefund(payment: { before: string | null, after: string }, now: string | null): { restored: string | null } | null {
  return now === payment.after ? { restored: payment.before } : null
}

export interface DuesRefusal { code: 'AWAITING_APPROVAL' | 'SUSPENDED' | 'RESIGNED', message: string }

/**
 * Why a member with `status` (and `approvedAt`) may not pay dues now, or [] when they may: approved
 * members (first dues), active, grace and lapsed members pay; a sign-up awaiting approval, a
 * suspended and a resigned member (until the admin lets them rejoin) are refused.
 */
export function duesRefusals(status: MembershipStatus, approvedAt: Date | string | null): DuesRefusal[] {
  if (status === 'suspended') return [{ code: 'SUSPENDED', message: 'Your membership is suspended: dues can be paid once the admin reinstates it.' }]
  if (status === 'resigned') return [{ code: 'RESIGNED', message: 'You have resigned: ask the admin to let you rejoin, then pay your dues.' }]
  if (status === 'pending' && !approvedAt) return [{ code: 'AWAITING_APPROVAL', message: 'Your sign-up awaits the admin\'s approval: dues can be paid once it is approved.' }]
  return []
}

/** Which plans someone born on `birthDate` may pay on `today`: under 18 the junior plans, else the adult ones (Adult, Student). */
export function planAudienceFor(birthDate: string | null | undefined, today: string): 'adult' | 'junior' {
  return isJunior(birthDate, today) ? 'junior' : 'adult'
}

/** An amount in minor units with its currency, as receipts and pages show it: "EUR 60.00". */
export function formatMoney(amountMinor: number, currency: string): string {
  const digits = ['JPY', 'KRW', 'ISK'].includes(currency) ? 0 : 2
  return `${currency} ${(amountMinor / 10 ** digits).toFixed(digits)}`
}

export const PAYMENT_METHODS = ['card', 'cash', 'transfer'] as const
export type PaymentMethod = typeof PAYMENT_METHODS[number]
export const PAYMENT_METHOD_LABELS: Record<PaymentMethod, string> = { card: 'Card', cash: 'Cash', transfer: 'Bank transfer' }

export const PAYMENT_STATUSES = ['pending', 'paid', 'failed', 'expired', 'refunded'] as const
export type PaymentStatus = typeof PAYMENT_STATUSES[number]
export const PAYMENT_STATUS_LABELS: Record<PaymentStatus, string> = {
  pending: 'Awaiting payment',
  paid: 'Paid',
  failed: 'Failed',
  expired: 'Checkout expired',
  refunded: 'Refunded',
}
