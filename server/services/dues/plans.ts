import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { duesRefusals, planAudienceFor, renewedPaidThrough } from '#shared/utils/dues-renewal'
import type { DuesPlanDto, RenewalOptionsDto } from '#shared/types/dues'

interface PlanRow { id: string, code: string, name: string, audience: 'adult' | 'junior', price_minor: number, currency: string, period_months: number }

const toPlanDto = (p: PlanRow): DuesPlanDto => ({
  id: p.id, code: p.code, name: p.name, audience: p.audience, priceMinor: p.price_minor, currency: p.currency, periodMonths: p.period_months,
})

/** Every dues plan of club `clubId`, cheapest last within each audience (adults first). */
export async function listPlans(clubId: string, transaction?: Transaction): Promise<DuesPlanDto[]> {
  const rows = await useDb().query<PlanRow>(`SELECT id, code, name, audience, price_minor, currency, period_months FROM dues_plans
    WHERE club_id = :clubId ORDER BY audience, price_minor DESC, name`, { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  return rows.map(toPlanDto)
}

/** Plan `planId` of club `clubId`, or a 404. */
export async function findPlan(clubId: string, planId: string, transaction?: Transaction): Promise<DuesPlanDto> {
  const plan = (await listPlans(clubId, transaction)).find(p => p.id === planId)
  return plan ?? notFound('No such dues plan')
}

/**
 * The plan `planId` a member born on `birthDate` may pay on `today`, or a 422: under 18 the junior
 * plans only; adults choose among the adult ones (Adult, Student).
 */
export async function planOpenTo(clubId: string, planId: string, birthDate: string | null, today: string, transaction?: Transaction): Promise<DuesPlanDto> {
  const plan = await findPlan(clubId, planId, transaction)
  const audience = planAudienceFor(birthDate, today)
  if (plan.audience !== audience) {
    refuse(audience === 'junior'
      ? { code: 'PLAN_JUNIOR_ONLY', message: 'Members under 18 on the payment date pay the Junior plan.' }
      : { code: 'PLAN_NOT_FOR_ADULTS', message: 'The Junior plan is for members under 18; choose Adult or Student.' })
  }
  return plan
}

/** What the renewal page offers the signed-in member: the plans open to them, their effect, and any refusal. */
export async function renewalOptions(actor: Actor): Promise<RenewalOptionsDto> {
  const today = clubToday(actor.club)
  const audience = planAudienceFor(actor.membership.birthDate, today)
  const plans = (await listPlans(actor.club.id)).filter(p => p.audience === audience)
  const paidThrough = actor.membership.paidThrough
  return {
    status: actor.status,
    paidThrough,
    currentPlanId: plans.some(p => p.id === actor.membership.duesPlanId) ? actor.membership.duesPlanId : (plans[0]?.id ?? null),
    plans,
    wouldRunThrough: Object.fromEntries(plans.map(p => [p.id, renewedPaidThrough(paidThrough, today, p.periodMonths)])),
    refusals: duesRefusals(actor.status, actor.membership.approvedAt),
  }
}
