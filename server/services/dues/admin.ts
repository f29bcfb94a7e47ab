import { randomUUID } from 'node:crypto'
import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockMemberships } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubToday } from '../clubs'
import { kickNoticeQueue } from '../notices'
import { duesRefusals } from '#shared/utils/dues-renewal'
import { membershipStatus } from '#shared/utils/membership-status'
import type { DuesPlanEdit, OfflinePayment } from '#shared/schemas/dues'
import { findPayment, queueReceipt, refundPayment, renew } from './ledger'
import { findPlan, listPlans, planOpenTo } from './plans'
import { providerRefusal, usePayments } from './provider'

/**
 * Records a cash or bank-transfer payment (dues.manage): the same rules as a card renewal (who may
 * pay, the plan for their age), dated `paidOn` (not in the future), renewed like a card payment,
 * receipted and audited. Returns the payment id and the new paid-through date.
 */
export async function recordOfflinePayment(actor: Actor, input: OfflinePayment): Promise<{ paymentId: string, paidThrough: string }> {
  const club = actor.club
  if (input.paidOn > clubToday(club)) refuse({ code: 'PAID_IN_FUTURE', message: 'The payment date cannot be after today.' })
  const result = await inTransaction(async (transaction) => {
    const member = (await lockMemberships([input.memberId], transaction, club.id)).get(input.memberId) ?? notFound('No such member')
    const status = membershipStatus(member, { timeZone: club.timeZone, graceDays: club.graceDays })
    const refusals = duesRefusals(status, member.approvedAt)
    if (refusals.length) refuse(refusals.map(r => ({ code: r.code, message: `This member cannot pay now: ${r.message}` })))
    const plan = await planOpenTo(club.id, input.planId, member.birthDate, input.paidOn, transaction)
    const id = randomUUID()
    const renewal = await renew(member, club, { plan_id: plan.id, period_months: plan.periodMonths }, input.paidOn, transaction)
    const row = {
      id, plan_name: plan.name, method: input.method, amount_minor: input.amountMinor, currency: plan.currency, paid_on: input.paidOn,
      paid_through_before: renewal.before, paid_through_after: renewal.after, receipt_number: renewal.receipt,
    }
    await useDb().query(`
      INSERT INTO payments (id, club_id, membership_id, plan_id, plan_name, method, status, amount_minor, currency, period_months,
        paid_on, paid_through_before, paid_through_after, receipt_number, reference, recorded_by_membership_id)
      VALUES (:id, :clubId, :membershipId, :planId, :plan_name, :method, 'paid', :amount_minor, :currency, :period, :paid_on,
        :paid_through_before, :paid_through_after, :receipt_number, :reference, :by)`, {
      replacements: { ...row, clubId: club.id, membershipId: member.id, planId: plan.id, period: plan.periodMonths, reference: input.reference ?? null, by: actor.membership.id },
      transaction,
    })
    await queueReceipt(club, member.id, row, transaction)
    await recordAudit(actor, club.id, {
      action: 'dues.offline_payment', subjectType: 'payment', subjectId: id,
      before: { paidThrough: renewal.before },
      after: { membershipId: member.id, method: input.method, amountMinor: input.amountMinor, currency: plan.currency, plan: plan.name, paidOn: input.paidOn, paidThrough: renewal.after, receipt: renewal.receipt },
    }, transaction)
    return { paymentId: id, paidThrough: renewal.after }
  })
  kickNoticeQueue()
  return result
}

/**
 * Refunds payment `paymentId` of the admin's club in full (dues.manage): only the membership's latest
 * payment; a card payment through the SDK (once: the refund is keyed by the payment), cash and
 * transfers recorded as paid back. Paid-through returns to the date the payment replaced; the member
 * is told; audited. A refund the webhook applied first (the service answered quickly) counts as done.
 */
export async function refundLatestPayment(actor: Actor, paymentId: string, note: string | null): Promise<{ paidThrough: string | null }> {
  const payment = await findPayment('id', paymentId)
  if (!payment || payment.club_id !== actor.club.id) notFound('No such payment')
  if (payment.status !== 'paid') refuse({ code: 'NOT_PAID', message: payment.status === 'refunded' ? 'This payment was refunded already.' : 'Only a payment that was received can be refunded.' })
  const [member] = await useDb().query<{ paid_through: string | null }>('SELECT paid_through::text AS paid_through FROM memberships WHERE id = :id',
    { replacements: { id: payment.membership_id }, type: QueryTypes.SELECT })
  if (member?.paid_through !== payment.paid_through_after) {
    refuse({ code: 'REFUND_NOT_LATEST', message: 'Only the latest payment of a membership can be refunded (in full); older payments and partial refunds are out of scope.' })
  }
  let providerRefundId: string | null = null
  if (payment.method === 'card') {
    try {
      const refund = await usePayments().refunds.create({ payment_intent: payment.provider_payment_intent_id!, metadata: { paymentId } }, { idempotencyKey: `refund-${paymentId}` })
      providerRefundId = refund.id
    }
    catch (error) {
      const refusal = providerRefusal(error)
      if (refusal) refuse(refusal)
      throw createError({ statusCode: 502, statusMessage: 'Bad Gateway', message: 'The payment service did not answer; nothing was refunded. Try again.' })
    }
  }
  const result = await inTransaction(async (transaction) => {
    const done = await refundPayment(paymentId, transaction, { latestOnly: true, providerRefundId, recordedBy: actor.membership.id, note })
    const [after] = await useDb().query<{ paid_through: string | null }>('SELECT paid_through::text AS paid_through FROM memberships WHERE id = :id',
      { replacements: { id: payment.membership_id }, type: QueryTypes.SELECT, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'dues.refund', subjectType: 'payment', subjectId: paymentId,
      before: { paidThrough: payment.paid_through_after },
      after: { membershipId: payment.membership_id, method: payment.method, amountMinor: payment.amount_minor, currency: payment.currency, paidThrough: after?.paid_through ?? null, appliedBy: done ? 'admin' : 'payment service event' },
      reason: note,
    }, transaction)
    return { paidThrough: after?.paid_through ?? null }
  })
  kickNoticeQueue()
  return result
}

/** Sets the plan member `memberId` renews on (dues.manage); audited. */
export async function setMemberPlan(actor: Actor, memberId: string, planId: string): Promise<{ planId: string }> {
  await inTransaction(async (transaction) => {
    const member = (await lockMemberships([memberId], transaction, actor.club.id)).get(memberId) ?? notFound('No such member')
    const plans = await listPlans(actor.club.id, transaction)
    const plan = plans.find(p => p.id === planId) ?? notFound('No such dues plan')
    const before = plans.find(p => p.id === member.duesPlanId)?.name ?? null
    await member.update({ duesPlanId: plan.id }, { transaction })
    // The audit names the plans in words, as the audit page shows them.
    await recordAudit(actor, actor.club.id, { action: 'dues.member_plan', subjectType: 'membership', subjectId: memberId, before: { plan: before }, after: { plan: plan.name } }, transaction)
  })
  return { planId }
}

/** Changes dues plan `planId` (dues.manage); payments already made keep their own price and period. Audited. */
export async function editPlan(actor: Actor, planId: string, input: DuesPlanEdit): Promise<void> {
  await inTransaction(async (transaction) => {
    const before = await findPlan(actor.club.id, planId, transaction)
    await useDb().query(`UPDATE dues_plans SET name = :name, price_minor = :priceMinor, currency = :currency, period_months = :periodMonths, updated_at = now()
      WHERE id = :id AND club_id = :clubId`, { replacements: { ...input, id: planId, clubId: actor.club.id }, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'dues.plan_edit', subjectType: 'dues_plan', subjectId: planId,
      before: { name: before.name, priceMinor: before.priceMinor, currency: before.currency, periodMonths: before.periodMonths },
      after: { ...input },
    }, transaction)
  }, { uniqueMessage: 'Another plan already has this name.' })
}
