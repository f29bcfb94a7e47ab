import type { PaymentMethod, PaymentStatus } from '../utils/dues-renewal'
import type { MembershipStatus } from '../utils/membership-status'

/** A dues plan as pages show it. */
export interface DuesPlanDto {
  id: string
  code: string
  name: string
  audience: 'adult' | 'junior'
  priceMinor: number
  currency: string
  periodMonths: number
}

/** What the renewal page needs: the plans the member may choose, their standing, and why they may not pay. */
export interface RenewalOptionsDto {
  status: MembershipStatus
  paidThrough: string | null
  currentPlanId: string | null
  plans: DuesPlanDto[]
  /** The paid-through date a payment today would set, per plan id. */
  wouldRunThrough: Record<string, string>
  refusals: { code: string, message: string }[]
}

/** One payment, as the admin's table and the member's receipts list show it. */
export interface PaymentDto {
  id: string
  memberId: string
  memberName: string
  planName: string
  method: PaymentMethod
  status: PaymentStatus
  amountMinor: number
  currency: string
  paidOn: string | null
  paidThroughBefore: string | null
  paidThroughAfter: string | null
  receiptNumber: number | null
  reference: string | null
  failureMessage: string | null
  createdAt: string
  /** Whether this is the membership's latest counted payment, the only one that can be refunded. */
  refundable: boolean
}

export interface PaymentListDto { items: PaymentDto[], total: number, page: number, pageSize: number }

/** A checkout as the return page polls it. */
export interface CheckoutStateDto {
  status: PaymentStatus
  paidThrough: string | null
  failureMessage: string | null
  receiptId: string | null
}

/** Everything a receipt carries (e-mail, printable page, PDF). */
export interface ReceiptDto {
  paymentId: string
  receiptNumber: number
  /** The number as printed: club-unique, sequential: "R-000042". */
  receiptLabel: string
  clubName: string
  memberName: string
  planName: string
  periodFrom: string
  periodThrough: string
  amountMinor: number
  currency: string
  method: PaymentMethod
  paidOn: string
  refunded: boolean
}

export interface MonthTotalDto { month: string, currency: string, paidMinor: number, refundedMinor: number, count: number }

export interface StandingListItemDto { id: string, name: string, status: 'grace' | 'lapsed', paidThrough: string }
