import { z } from 'zod'
import { isoDate } from './common'
import { MAX_EQUIPMENT_FACTOR, MIN_EQUIPMENT_FACTOR } from '../utils/event-rules'
import { psiToBar } from '../utils/units'

const textLine = (max: number, required: string) => z.string({ required_error: required, invalid_type_error: required })
  .trim().min(1, required).max(max, `At most ${max} characters`)
  .refine(v => !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v), 'Use one line of visible characters')
const longText = (max: number) => z.string({ invalid_type_error: 'Text, please' }).trim().max(max, `At most ${max} characters`)
  .refine(v => !/[\p{Cc}\p{Cf}]/u.test(v.replace(/[\n\t]/g, '')), 'Use visible characters only')
const uuid = (message: string) => z.string({ invalid_type_error: message, required_error: message }).uuid(message).transform(id => id.toLowerCase())

/** `value` entered in `unit` (bar or psi), in bar. */
export function enteredBar(value: number, unit: 'bar' | 'psi'): number {
  return unit === 'psi' ? psiToBar(value) : value
}

/** Refuses a pressure whose value in bar is above `maxBar`, on the field `field`. */
const atMostBar = (field: string, maxBar: number, what: string) => (v: Record<string, unknown>, ctx: z.RefinementCtx) => {
  const value = v[field]
  if (typeof value === 'number' && (v.unit === 'bar' || v.unit === 'psi') && enteredBar(value, v.unit) > maxBar) {
    ctx.addIssue({ code: 'custom', path: [field], message: `${what} is at most ${maxBar} bar` })
  }
}

/** The units a member enters a pressure in on these forms: their preferred one. Converted to bar by the server. */
export const EVENT_PRESSURE_UNITS = ['bar', 'psi'] as const
const unit = z.enum(EVENT_PRESSURE_UNITS, { errorMap: () => ({ message: 'Use bar or psi' }) })
const pressure = (what: string, maxBar: number) => z.number({ invalid_type_error: `${what} must be a number`, required_error: `Enter ${what.toLowerCase()}` })
  .finite().positive(`${what} must be more than 0`).max(maxBar * 14.6, `${what} is at most ${maxBar} bar`)

/**
 * A fill station (launcher, hoses, regulator) as an officer with `events.manage` adds or changes it:
 * the rated pressure of its lowest-rated part, in the unit entered, and its one gauge.
 */
export const FillStationSchema = z.object({
  name: textLine(80, 'Give the fill station a name'),
  description: longText(1000).default(''),
  lowestPartRating: pressure('The lowest rated pressure of any part', 1000),
  unit,
  gaugeName: textLine(80, 'Name the gauge'),
  gaugeCalibratedOn: isoDate,
  gaugeIntervalMonths: z.number({ invalid_type_error: 'The interval must be a number', required_error: 'Enter the calibration interval' })
    .int('Whole months').min(1, 'At least 1 month').max(60, 'At most 60 months'),
}).strict().superRefine(atMostBar('lowestPartRating', 1000, 'The lowest rated pressure of any part'))
export type FillStationInput = z.infer<typeof FillStationSchema>

/** Retiring a fill station: confirmed, with the reason kept in the audit trail. */
export const FillStationRetireSchema = z.object({
  reason: textLine(500, 'Say why the station is retired'),
}).strict()
export type FillStationRetire = z.infer<typeof FillStationRetireSchema>

/** The fill-stations list: retired ones only when asked. */
export const FillStationListQuerySchema = z.object({
  retired: z.enum(['include', 'exclude']).default('exclude').catch('exclude'),
})

/**
 * A launch event as a safety officer or admin (`events.manage`) creates or changes it: the day, the
 * site, the pressure cap (in the unit entered), whether it is a competition (air only, no metal in
 * the pressure path), the fill stations it uses and its staff (instructors and safety officers).
 */
export const LaunchEventSchema = z.object({
  heldOn: isoDate,
  site: textLine(120, 'Name the site'),
  pressureCap: pressure('The pressure cap', 100),
  unit,
  competition: z.boolean({ invalid_type_error: 'Yes or no', required_error: 'Yes or no' }),
  notes: longText(2000).default(''),
  stationIds: z.array(uuid('Not a fill station')).min(1, 'Choose at least one fill station').max(20, 'At most 20 fill stations')
    .transform(ids => [...new Set(ids)]),
  staffIds: z.array(uuid('Not a member')).min(1, 'Choose at least one member of staff').max(40, 'At most 40 staff')
    .transform(ids => [...new Set(ids)]),
}).strict().superRefine(atMostBar('pressureCap', 100, 'The pressure cap'))
export type LaunchEventInput = z.infer<typeof LaunchEventSchema>

/** Cancelling an event: the reason goes to every registered member. */
export const LaunchEventCancelSchema = z.object({
  reason: textLine(500, 'Say why the event is cancelled'),
}).strict()
export type LaunchEventCancel = z.infer<typeof LaunchEventCancelSchema>

/** A walk-in the event's staff add on the day: a member of the club, by membership id. */
export const WalkInSchema = z.object({ membershipId: uuid('Choose a member') }).strict()
export type WalkIn = z.infer<typeof WalkInSchema>

/** The events list: upcoming (today on, soonest first) or past (latest first), server-paged. */
export const LaunchEventListQuerySchema = z.object({
  when: z.enum(['upcoming', 'past']).default('upcoming').catch('upcoming'),
  page: z.coerce.number().int().min(1).max(100_000).default(1).catch(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25).catch(25),
})
export type LaunchEventListQuery = z.infer<typeof LaunchEventListQuerySchema>

export const FILL_LOG_SORT_FIELDS = ['createdAt', 'member', 'vessel', 'pressure', 'outcome'] as const

/** An event's fills and refused attempts, sorted and paged by the server (and the CSV of the same filter). */
export const FillLogQuerySchema = z.object({
  outcome: z.enum(['allowed', 'refused']).optional().catch(undefined),
  sort: z.enum(FILL_LOG_SORT_FIELDS).default('createdAt').catch('createdAt'),
  dir: z.enum(['asc', 'desc']).default('desc').catch('desc'),
  page: z.coerce.number().int().min(1).max(100_000).default(1).catch(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25).catch(25),
})
export type FillLogQuery = z.infer<typeof FillLogQuerySchema>

/** The member's own fills, newest first, server-paged. */
export const MyFillsQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1).catch(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25).catch(25),
})
export type MyFillsQuery = z.infer<typeof MyFillsQuerySchema>

/** The equipment factor as the vessel policy takes it: never below 3, at most two decimals. */
export const equipmentFactorField = z.number({ invalid_type_error: 'The equipment factor must be a number', required_error: 'Enter the equipment factor' })
  .finite().min(MIN_EQUIPMENT_FACTOR, `The equipment factor is never below ${MIN_EQUIPMENT_FACTOR}`)
  .max(MAX_EQUIPMENT_FACTOR, `The equipment factor is at most ${MAX_EQUIPMENT_FACTOR}`)
  .refine(v => Math.abs(Math.round(v * 100) - v * 100) < 1e-6, 'At most two decimal places')
