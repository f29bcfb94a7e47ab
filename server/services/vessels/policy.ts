import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import type { VesselPolicyInput } from '#shared/schemas/proof'
import type { VesselPolicyDto } from '#shared/types/proof-tests'
import { DEFAULT_PROOF_POLICY, DEFAULT_HAND_LAYUP_PROCESS_FACTOR, constructionFamily, type VesselConstruction } from '#shared/utils/vessel-arithmetic'
import { dateInZone } from '#shared/utils/dates'
import { MIN_EQUIPMENT_FACTOR } from '#shared/utils/event-rules'
import { DEFAULT_DISTANCE_RULE } from './distance-rule'

/** The policy every club starts with (and has until its safety officer saves one). */
export const STARTING_VESSEL_POLICY: VesselPolicyDto = {
  marginRatio: DEFAULT_PROOF_POLICY.marginRatio,
  intervalMonths: { ...DEFAULT_PROOF_POLICY.intervalMonths },
  fillLimit: { ...DEFAULT_PROOF_POLICY.fillLimit },
  cureWaitDays: DEFAULT_PROOF_POLICY.cureWaitDays,
  airTestsAllowed: false,
  distanceRule: DEFAULT_DISTANCE_RULE,
  kProcess: DEFAULT_HAND_LAYUP_PROCESS_FACTOR,
  equipmentFactor: MIN_EQUIPMENT_FACTOR,
}

/** The policy columns of `vessel_policies p` that `toPolicyDto` reads (NULL throughout without a row). */
export const POLICY_COLUMNS_SQL = `p.margin_ratio, p.interval_months_single_bottle, p.interval_months_spliced_bottles,
      p.interval_months_overwrapped_liner, p.interval_months_mandrel_tube, p.interval_months_other,
      p.fill_limit_bottle, p.fill_limit_laminate, p.cure_wait_days, p.air_tests_allowed, p.distance_rule, p.k_process,
      p.equipment_factor`

/** A row of POLICY_COLUMNS_SQL. */
export interface PolicyRow {
  margin_ratio: string | null
  interval_months_single_bottle: number
  interval_months_spliced_bottles: number
  interval_months_overwrapped_liner: number
  interval_months_mandrel_tube: number
  interval_months_other: number
  fill_limit_bottle: number
  fill_limit_laminate: number
  cure_wait_days: number
  air_tests_allowed: boolean
  distance_rule: VesselPolicyDto['distanceRule']
  k_process: string
  equipment_factor: string | null
}

/** The policy a row of POLICY_COLUMNS_SQL holds: the starting policy when the club has saved none. */
export function toPolicyDto(r: PolicyRow): VesselPolicyDto {
  const equipmentFactor = r.equipment_factor === null ? MIN_EQUIPMENT_FACTOR : Number(r.equipment_factor)
  if (r.margin_ratio === null) return { ...structuredClone(STARTING_VESSEL_POLICY), equipmentFactor }
  return {
    marginRatio: Number(r.margin_ratio),
    intervalMonths: {
      single_bottle: r.interval_months_single_bottle,
      spliced_bottles: r.interval_months_spliced_bottles,
      overwrapped_liner: r.interval_months_overwrapped_liner,
      mandrel_tube: r.interval_months_mandrel_tube,
      other: r.interval_months_other,
    },
    fillLimit: { bottle: r.fill_limit_bottle, laminate: r.fill_limit_laminate },
    cureWaitDays: r.cure_wait_days,
    airTestsAllowed: r.air_tests_allowed,
    distanceRule: r.distance_rule,
    kProcess: Number(r.k_process),
    equipmentFactor,
  }
}

/** What the proof rules of club `clubId` need: its vessel policy and its today (YYYY-MM-DD, its time zone). */
export interface ClubVesselRules {
  policy: VesselPolicyDto
  today: string
}

/**
 * Club `clubId`'s vessel policy (the starting policy when it has not saved one) and its today, in one
 * query; null when there is no such club.
 */
export async function clubVesselRules(clubId: string, transaction?: Transaction, now = new Date()): Promise<ClubVesselRules | null> {
  const [row] = await useDb().query<PolicyRow & { time_zone: string }>(
    `SELECT c.time_zone, ${POLICY_COLUMNS_SQL}
    FROM clubs c LEFT JOIN vessel_policies p ON p.club_id = c.id WHERE c.id = :clubId`,
    { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  return row ? { policy: toPolicyDto(row), today: dateInZone(now, row.time_zone) } : null
}

/** Club `clubId`'s vessel policy (the starting one for an unknown club). */
export async function vesselPolicy(clubId: string): Promise<VesselPolicyDto> {
  return (await clubVesselRules(clubId))?.policy ?? structuredClone(STARTING_VESSEL_POLICY)
}

/** The proof interval (months) the policy gives `construction`. */
export function policyIntervalMonths(policy: VesselPolicyDto, construction: VesselConstruction): number {
  return policy.intervalMonths[construction]
}

/** The fill limit the policy gives `construction`'s family (bottle or laminate). */
export function policyFillLimit(policy: VesselPolicyDto, construction: VesselConstruction): number {
  return policy.fillLimit[constructionFamily(construction)]
}

/**
 * The safety officer saves the club's whole vessel policy (validated by the schema, and by the
 * table's checks: a margin below 1.25 never lands). Audited with the policy before and after.
 */
export async function updateVesselPolicy(actor: Actor, input: VesselPolicyInput): Promise<VesselPolicyDto> {
  const clubId = actor.club.id
  return inTransaction(async (transaction) => {
    // The club row's lock serialises two officers saving at once, so each audit's "before" is true.
    await useDb().query('SELECT id FROM clubs WHERE id = :clubId FOR UPDATE', { replacements: { clubId }, transaction })
    const before = (await clubVesselRules(clubId, transaction))!.policy
    await useDb().query(
      `INSERT INTO vessel_policies (club_id, margin_ratio, interval_months_single_bottle, interval_months_spliced_bottles,
        interval_months_overwrapped_liner, interval_months_mandrel_tube, interval_months_other, fill_limit_bottle,
        fill_limit_laminate, cure_wait_days, air_tests_allowed, distance_rule, k_process, equipment_factor, updated_at)
      VALUES (:clubId, :margin, :single, :spliced, :overwrapped, :mandrel, :other, :bottle, :laminate, :cure, :air, :rule, :k, :factor, now())
      ON CONFLICT (club_id) DO UPDATE SET margin_ratio = EXCLUDED.margin_ratio,
        interval_months_single_bottle = EXCLUDED.interval_months_single_bottle,
        interval_months_spliced_bottles = EXCLUDED.interval_months_spliced_bottles,
        interval_months_overwrapped_liner = EXCLUDED.interval_months_overwrapped_liner,
        interval_months_mandrel_tube = EXCLUDED.interval_months_mandrel_tube,
        interval_months_other = EXCLUDED.interval_months_other, fill_limit_bottle = EXCLUDED.fill_limit_bottle,
        fill_limit_laminate = EXCLUDED.fill_limit_laminate, cure_wait_days = EXCLUDED.cure_wait_days,
        air_tests_allowed = EXCLUDED.air_tests_allowed, distance_rule = EXCLUDED.distance_rule,
        k_process = EXCLUDED.k_process, equipment_factor = EXCLUDED.equipment_factor, updated_at = now()`,
      {
        replacements: {
          clubId, margin: input.marginRatio, single: input.intervalMonths.single_bottle, spliced: input.intervalMonths.spliced_bottles,
          overwrapped: input.intervalMonths.overwrapped_liner, mandrel: input.intervalMonths.mandrel_tube, other: input.intervalMonths.other,
          bottle: input.fillLimit.bottle, laminate: input.fillLimit.laminate, cure: input.cureWaitDays, air: input.airTestsAllowed,
          rule: input.distanceRule, k: input.kProcess, factor: input.equipmentFactor,
        },
        transaction,
      })
    const after = (await clubVesselRules(clubId, transaction))!.policy
    await recordAudit(actor, clubId, {
      action: 'policy.vessels', subjectType: 'club', subjectId: clubId,
      before: before as unknown as Record<string, unknown>, after: after as unknown as Record<string, unknown>,
    }, transaction)
    return after
  })
}
