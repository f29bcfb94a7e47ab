import PDFDocument from 'pdfkit'
import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { actorCan } from '../../utils/auth'
import { formatMoney, periodStartsOn, PAYMENT_METHOD_LABELS, type PaymentMethod } from '#shared/utils/dues-renewal'
import { formatCalendarDate } from '#shared/utils/dates'
import type { ReceiptDto } from '#shared/types/dues'
import { receiptLabel } from './ledger'

interface ReceiptRow {
  id: string
  receipt_number: number
  club_name: string
  member_name: string
  plan_name: string
  paid_on: string
  paid_through_before: string | null
  paid_through_after: string
  amount_minor: number
  currency: string
  method: PaymentMethod
  status: string
}

/**
 * The receipt of counted payment `paymentId`: the member's own, or any of the club's with dues.manage;
 * 404 otherwise (also for a payment that was never received).
 */
export async function receiptFor(actor: Actor, paymentId: string): Promise<ReceiptDto> {
  const all = actorCan(actor, 'dues.manage')
  const [row] = await useDb().query<ReceiptRow>(`
    SELECT p.id, p.receipt_number, c.name AS club_name, u.name AS member_name, p.plan_name, p.paid_on::text AS paid_on,
      p.paid_through_before::text AS paid_through_before, p.paid_through_after::text AS paid_through_after,
      p.amount_minor, p.currency, p.method, p.status
    FROM payments p JOIN clubs c ON c.id = p.club_id JOIN memberships m ON m.id = p.membership_id JOIN users u ON u.id = m.user_id
    WHERE p.id = :id AND p.club_id = :clubId AND p.status IN ('paid', 'refunded') AND (:all OR p.membership_id = :membershipId)`, {
    replacements: { id: paymentId, clubId: actor.club.id, all, membershipId: actor.membership.id }, type: QueryTypes.SELECT,
  })
  if (!row) notFound('No such receipt')
  return {
    paymentId: row.id, receiptNumber: row.receipt_number, receiptLabel: receiptLabel(row.receipt_number), clubName: row.club_name,
    memberName: row.member_name, planName: row.plan_name, periodFrom: periodStartsOn(row.paid_through_before, row.paid_on),
    periodThrough: row.paid_through_after, amountMinor: row.amount_minor, currency: row.currency, method: row.method,
    paidOn: row.paid_on, refunded: row.status === 'refunded',
  }
}

/** The receipt as the lines every format prints (page, PDF), label and value. */
export function receiptLines(r: ReceiptDto): [string, string][] {
  return [
    ['Receipt number', r.receiptLabel],
    ['Club', r.clubName],
    ['Member', r.memberName],
    ['Plan', r.planName],
    ['Period covered', `${formatCalendarDate(r.periodFrom)} to ${formatCalendarDate(r.periodThrough)}`],
    ['Amount', formatMoney(r.amountMinor, r.currency)],
    ['Method', PAYMENT_METHOD_LABELS[r.method]],
    ['Paid on', formatCalendarDate(r.paidOn)],
    ...(r.refunded ? [['Refunded', 'This payment was refunded in full.'] as [string, string]] : []),
  ]
}

/** The receipt as a one-page PDF (A4, the built-in Helvetica), for the member and the audit desk. */
export function receiptPdf(r: ReceiptDto): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const doc = new PDFDocument({ size: 'A4', margin: 56, info: { Title: `${r.clubName} receipt ${r.receiptLabel}`, Author: r.clubName } })
    const chunks: Buffer[] = []
    doc.on('data', (c: Buffer) => chunks.push(c))
    doc.on('end', () => resolve(Buffer.concat(chunks)))
    doc.on('error', reject)
    doc.font('Helvetica-Bold').fontSize(18).text(r.clubName)
    doc.font('Helvetica').fontSize(12).text('Receipt for membership dues').moveDown(1.5)
    for (const [label, value] of receiptLines(r)) {
      doc.font('Helvetica-Bold').text(`${label}: `, { continued: true }).font('Helvetica').text(value)
      doc.moveDown(0.4)
    }
    doc.moveDown(1).fontSize(9).fillColor('#555555')
      .text('Paid dues keep a membership; they do not by themselves allow a fill, which also takes the member\'s tier, courses, waiver and vessel checks.')
    doc.end()
  })
}
