import { QueryTypes } from 'sequelize'
import { addCalendarDays, addCalendarMonths } from '#shared/utils/dates'
import { isJunior } from '#shared/utils/membership-status'
import { renewedPaidThrough } from '#shared/utils/dues-renewal'
import type { SeedContext } from './context'

const METHODS = ['card', 'cash', 'transfer'] as const

/**
 * Dues payments for the demo club: every member who has paid gets the payment that set their
 * paid-through date (a late renewal a year before it, so grace and lapsed members show theirs too),
 * by card, cash or transfer in turn; every third also an earlier one; one member's later cash
 * payment was refunded. Skipped for a member who already has payments (idempotent).
 */
export async function seedDuesPayments(ctx: SeedContext): Promise<void> {
  const { sequelize, transaction, clubId } = ctx
  if (!clubId) throw new Error('seedClub must run before seedDuesPayments')
  const plans = await sequelize.query<{ id: string, code: string, name: string, price_minor: number, currency: string, period_months: number }>(
    'SELECT id, code, name, price_minor, currency, period_months FROM dues_plans WHERE club_id = :clubId', { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  const plan = (code: string) => plans.find(p => p.code === code)!
  const members = await sequelize.query<{ id: string, paid_through: string, birth_date: string | null, has: boolean }>(`
    SELECT m.id, m.paid_through::text AS paid_through, m.birth_date::text AS birth_date,
      EXISTS (SELECT 1 FROM payments p WHERE p.membership_id = m.id) AS has
    FROM memberships m WHERE m.club_id = :clubId AND m.paid_through IS NOT NULL ORDER BY m.created_at, m.id`,
  { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  const insert = async (p: { membershipId: string, planCode: string, method: typeof METHODS[number], paidOn: string, before: string | null, after: string, status?: 'paid' | 'refunded', n: number }) => {
    const chosen = plan(p.planCode)
    const [{ receipt }] = await sequelize.query<{ receipt: number }>(
      'UPDATE clubs SET next_receipt_number = next_receipt_number + 1 WHERE id = :clubId RETURNING next_receipt_number - 1 AS receipt',
      { replacements: { clubId }, type: QueryTypes.SELECT, transaction }) as [{ receipt: number }]
    const [{ id }] = await sequelize.query<{ id: string }>(`
      INSERT INTO payments (club_id, membership_id, plan_id, plan_name, method, status, amount_minor, currency, period_months, paid_on,
        paid_through_before, paid_through_after, receipt_number, reference, provider_checkout_id, provider_payment_intent_id,
        recorded_by_membership_id, created_at, updated_at)
      VALUES (:clubId, :membershipId, :planId, :planName, :method, :status, :amount, :currency, :period, :paidOn, :before, :after, :receipt,
        :reference, :checkout, :intent, :recordedBy, :paidOn::date + time '10:00', :paidOn::date + time '10:00')
      RETURNING id`, {
      replacements: {
        clubId, membershipId: p.membershipId, planId: chosen.id, planName: chosen.name, method: p.method, status: p.status ?? 'paid',
        amount: chosen.price_minor, currency: chosen.currency, period: chosen.period_months, paidOn: p.paidOn, before: p.before, after: p.after, receipt,
        reference: p.method === 'transfer' ? `DUES-${p.n}` : p.method === 'cash' ? `Receipt book ${100 + p.n}` : null,
        // Demo ids only: the local payment fake does not know these, so they cannot be refunded by card.
        checkout: p.method === 'card' ? `cs_demo_${p.n}` : null,
        intent: p.method === 'card' ? `pi_demo_${p.n}` : null,
        recordedBy: p.method === 'card' ? null : ctx.memberIds.get('admin@hoopwise.example') ?? null,
      },
      type: QueryTypes.SELECT,
      transaction,
    }) as [{ id: string }]
    return id
  }
  let n = 0
  for (const m of members) {
    n += 1
    if (m.has) continue
    const paidOn = addCalendarMonths(m.paid_through, -12)
    const code = isJunior(m.birth_date, paidOn) ? 'junior' : n % 5 === 0 ? 'student' : 'adult'
    const before = n % 3 === 0 ? addCalendarDays(paidOn, -10) : null
    if (before) {
      await insert({ membershipId: m.id, planCode: code, method: METHODS[(n + 1) % 3]!, paidOn: addCalendarMonths(before, -12), before: null, after: before, n: n * 10 })
    }
    await insert({ membershipId: m.id, planCode: code, method: METHODS[n % 3]!, paidOn, before, after: renewedPaidThrough(before, paidOn, 12), n })
  }
  // One refund: a member's cash payment taken in error and paid back the same week.
  const refunded = ctx.memberIds.get('member@hoopwise.example')
  const already = await sequelize.query('SELECT 1 FROM refunds WHERE membership_id = :id', { replacements: { id: refunded }, type: QueryTypes.SELECT, transaction })
  const member = members.find(m => m.id === refunded)
  if (refunded && member && !already.length) {
    const paidOn = addCalendarDays(ctx.today, -20)
    const id = await insert({ membershipId: refunded, planCode: 'adult', method: 'cash', paidOn, before: member.paid_through, after: renewedPaidThrough(member.paid_through, paidOn, 12), status: 'refunded', n: 999 })
    await sequelize.query(`INSERT INTO refunds (club_id, payment_id, membership_id, amount_minor, currency, refunded_on, paid_through_restored, note, recorded_by_membership_id)
      SELECT club_id, id, membership_id, amount_minor, currency, :refundedOn, :restored, 'Paid twice by mistake (demo record)', recorded_by_membership_id FROM payments WHERE id = :id`, {
      replacements: { id, refundedOn: addCalendarDays(paidOn, 3), restored: member.paid_through }, transaction,
    })
  }
}
