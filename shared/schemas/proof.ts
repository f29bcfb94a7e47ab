import { z } from 'zod'
import { isoDate, optionalText } from './common'
import { PRESSURE_ENTRY_UNITS } from '../utils/units'
import { equipmentFactorField } from './events'
import { DISTANCE_RULES, MIN_PROOF_MARGIN, VESSEL_CONSTRUCTIONS } from '../utils/vessel-arithmetic'
import { FAILURE_LOCATIONS, PROOF_RESULTS, REPORTABLE_VESSEL_EVENTS } from '../utils/vessel-transitions'

/** One printable line or a few lines of text, required (a reason an officer gives). */
const reasonText = (max: number, required: string) => z.string({ required_error: required, invalid_type_error: required })
  .trim().min(1, required).max(max, `At most ${max} characters`)
  .refine(v => !/[\p{Cc}\p{Cf}]/u.test(v.replace(/[\n\t]/g, '')), 'Use visible characters only')

const wholeNumber = (min: number, max: number, what: string) =>
  z.number({ invalid_type_error: `${what} must be a number`, required_error: `Enter ${what.toLowerCase()}` })
    .int(`${what} is a whole number`).min(min, `${what} is at least ${min}`).max(max, `${what} is at most ${max}`)

/** At most `places` decimal places (what the database column keeps). */
const places = (n: number, places: number) => Math.abs(Math.round(n * 10 ** places) - n * 10 ** places) < 1e-6

/**
 * A witnessed proof test as the instructor records it: the test pressure in the unit read off the
 * gauge (converted to bar on the way in), hold time, result, and where it failed unless it passed.
 */
export const ProofTestSchema = z.object({
  testedOn: isoDate.optional(),
  medium: z.enum(['water', 'air'], { errorMap: () => ({ message: 'Choose water or air' }) }).default('water'),
  pressure: z.number({ invalid_type_error: 'The test pressure must be a number', required_error: 'Enter the test pressure' })
    .finite().positive('The test pressure must be more than 0').max(5000, 'The test pressure is at most 5000 in any unit'),
  unit: z.enum(PRESSURE_ENTRY_UNITS, { errorMap: () => ({ message: 'Use bar, psi, kPa or MPa' }) }).default('bar'),
  holdS: wholeNumber(1, 3600, 'The hold time (s)').default(120),
  result: z.enum(PROOF_RESULTS, { errorMap: () => ({ message: 'Choose the result' }) }),
  failureLocation: z.enum(FAILURE_LOCATIONS, { errorMap: () => ({ message: 'Choose where it failed' }) }).nullable().optional(),
  notes: optionalText(2000),
  gaugePhotoId: z.string().uuid('Not a valid photo id').transform(id => id.toLowerCase()).nullable().optional(),
}).superRefine((v, ctx) => {
  if (v.result !== 'pass' && !v.failureLocation) ctx.addIssue({ code: 'custom', path: ['failureLocation'], message: 'Say where it failed' })
  if (v.result === 'pass' && v.failureLocation) ctx.addIssue({ code: 'custom', path: ['failureLocation'], message: 'A pass has no failure location' })
})
export type ProofTestInput = z.infer<typeof ProofTestSchema>

/** An owner or an officer reports what ends a vessel's proof at once. */
export const VesselEventReportSchema = z.object({
  kind: z.enum(REPORTABLE_VESSEL_EVENTS, { errorMap: () => ({ message: 'Choose what happened' }) }),
  happenedOn: isoDate.optional(),
  reason: reasonText(1000, 'Say what happened'),
  newLayupOn: isoDate.nullable().optional(),
}).superRefine((v, ctx) => {
  if (v.newLayupOn && v.kind !== 'repair' && v.kind !== 'modification') {
    ctx.addIssue({ code: 'custom', path: ['newLayupOn'], message: 'Only a repair or a modification lays the laminate up again' })
  }
})
export type VesselEventReport = z.infer<typeof VesselEventReportSchema>

/** Quarantine, release or retirement: the reason is required and kept in the vessel's log and the audit trail. */
export const VesselReasonSchema = z.object({ reason: reasonText(500, 'Give the reason') })
export type VesselReason = z.infer<typeof VesselReasonSchema>

const months = wholeNumber(1, 60, 'The interval (months)')
const fills = wholeNumber(1, 1000, 'The fill limit')

/** The club's vessel policy as the safety officer sets it, whole. */
export const VesselPolicySchema = z.object({
  marginRatio: z.number({ invalid_type_error: 'The margin must be a number', required_error: 'Enter the proof margin' }).finite()
    .min(MIN_PROOF_MARGIN, `The proof margin is never below ${MIN_PROOF_MARGIN}`).max(4, 'The proof margin is at most 4')
    .refine(v => places(v, 2), 'At most two decimal places'),
  intervalMonths: z.object(Object.fromEntries(VESSEL_CONSTRUCTIONS.map(c => [c, months])) as Record<typeof VESSEL_CONSTRUCTIONS[number], typeof months>),
  fillLimit: z.object({ bottle: fills, laminate: fills }),
  cureWaitDays: wholeNumber(0, 90, 'The cure wait (days)'),
  airTestsAllowed: z.boolean({ invalid_type_error: 'Yes or no', required_error: 'Yes or no' }),
  distanceRule: z.enum(DISTANCE_RULES, { errorMap: () => ({ message: 'Use tnt or 2tnt' }) }),
  kProcess: z.number({ invalid_type_error: 'The process factor must be a number', required_error: 'Enter the process factor' }).finite()
    .gt(0, 'The process factor is more than 0').max(1, 'The process factor is at most 1')
    .refine(v => places(v, 3), 'At most three decimal places'),
  equipmentFactor: equipmentFactorField,
})
export type VesselPolicyInput = z.infer<typeof VesselPolicySchema>
