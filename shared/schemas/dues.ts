import { z } from 'zod'
import { isoDate, optionalText } from './common'
import { PAYMENT_METHODS, PAYMENT_STATUSES } from '../utils/dues-renewal'

const uuid = z.string().uuid('Not a valid id').transform(id => id.toLowerCase())

/** A member starts a card renewal on a plan they may choose. */
export const CheckoutStartSchema = z.object({ planId: uuid })
export type CheckoutStart = z.infer<typeof CheckoutStartSchema>

/** The admin records a cash or bank-transfer payment: it renews like a card payment. */
export const OfflinePaymentSchema = z.object({
  memberId: uuid,
  planId: uuid,
  method: z.enum(['cash', 'transfer'], { message: 'Choose cash or bank transfer' }),
  amountMinor: z.number({ message: 'Enter the amount in cents' }).int('Whole cents only').min(1, 'Enter the amount').max(100_000_000, 'Too large'),
  paidOn: isoDate,
  reference: optionalText(120),
})
export type OfflinePayment = z.infer<typeof OfflinePaymentSchema>

/** The admin refunds the latest payment of a membership in full; for cash and transfers, confirms it was paid back. */
export const RefundSchema = z.object({
  confirm: z.literal(true, { message: 'Confirm the full refund' }),
  note: optionalText(300),
})
export type RefundInput = z.infer<typeof RefundSchema>

/** The admin sets the plan a member renews on. */
export const MemberPlanSchema = z.object({ planId: uuid })

/** The admin edits a dues plan: name, price in minor units, currency, period in months. */
export const DuesPlanEditSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(80, 'At most 80 characters'),
  priceMinor: z.number({ message: 'Enter the price in cents' }).int('Whole cents only').min(1, 'Enter a price').max(100_000_000, 'Too large'),
  currency: z.string().trim().toUpperCase().regex(/^[A-Z]{3}$/, 'A three-letter currency code (EUR, USD …)'),
  periodMonths: z.number({ message: 'Enter the months' }).int().min(1, 'At least 1 month').max(36, 'At most 36 months'),
})
export type DuesPlanEdit = z.infer<typeof DuesPlanEditSchema>

export const PAYMENT_SORT_FIELDS = ['paidOn', 'createdAt', 'amount', 'member', 'receiptNumber'] as const

/** The admin's payments table: filters in the URL, sorted and paged by the server. */
export const PaymentListQuerySchema = z.object({
  method: z.enum(PAYMENT_METHODS).optional().catch(undefined),
  status: z.enum(PAYMENT_STATUSES).optional().catch(undefined),
  planId: uuid.optional().catch(undefined),
  from: isoDate.optional().catch(undefined),
  to: isoDate.optional().catch(undefined),
  sort: z.enum(PAYMENT_SORT_FIELDS).default('createdAt').catch('createdAt'),
  dir: z.enum(['asc', 'desc']).default('desc').catch('desc'),
  page: z.coerce.number().int().min(1).max(100_000).default(1).catch(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25).catch(25),
})
export type PaymentListQuery = z.infer<typeof PaymentListQuerySchema>

/** The return page asks for one of the member's own checkouts by the session id in its address. */
export const CheckoutParamSchema = z.object({ session: z.string().regex(/^cs_[A-Za-z0-9_]{1,200}$/, 'Not a checkout') })
