import { z } from 'zod'
import { isoDate } from './common'
import { tierTableProblem, TIER_RANKS } from '../utils/tier-rules'

const count = (what: string) => z.number({ invalid_type_error: `${what}: a whole number` }).int('A whole number').min(0, 'At least 0').max(1000, 'At most 1000')
const capBar = z.number({ invalid_type_error: 'A pressure in bar' }).min(0, 'At least 0 bar').max(100, 'At most 100 bar')
const rank = z.number({ invalid_type_error: 'A tier rank, 0 to 4' }).int('A tier rank, 0 to 4').min(0, 'A tier rank, 0 to 4').max(4, 'A tier rank, 0 to 4')
/** A course code as the courses table keeps it. */
const courseCode = z.string().trim().regex(/^[a-z][a-z0-9_]{1,39}$/, 'A course code: lower-case letters, digits and _').max(40, 'At most 40 characters')

/** One row of the club's tier table as the safety officer edits it. */
export const TierLevelInputSchema = z.object({
  rank,
  name: z.string().trim().min(1, 'Name the tier').max(60, 'At most 60 characters'),
  fillCapBar: capBar,
  validityMonths: z.number({ invalid_type_error: 'A number of months' }).int('Whole months').min(1, 'At least 1 month').max(120, 'At most 120 months'),
  requiredCourseCodes: z.array(courseCode).max(10, 'At most 10 courses'),
  heldBelowMonths: z.number({ invalid_type_error: 'A number of months' }).int('Whole months').min(0, 'At least 0').max(120, 'At most 120 months'),
  minLoggedFills: count('Logged fills'),
  minSupervisedFills: count('Supervised fills'),
  supervisedFillsAboveBar: capBar.nullable(),
  minAgeYears: z.number({ invalid_type_error: 'An age in years' }).int('Whole years').min(0, 'At least 0').max(99, 'At most 99').nullable(),
  ownVesselProofRequired: z.boolean(),
  renewalMinFills: count('Renewal fills'),
}).strict()
export type TierLevelInput = z.infer<typeof TierLevelInputSchema>

/**
 * The whole tier table (T0 … T4, each once) and the junior cap. Caps must rise strictly with rank and
 * T0's is 0: refused here with the sentence the page shows (the database checks it again at commit).
 */
export const TierTableSchema = z.object({
  levels: z.array(TierLevelInputSchema).length(TIER_RANKS.length, 'Every tier, T0 to T4, once'),
  juniorCapRank: rank,
}).strict().superRefine((v, ctx) => {
  const ranks = new Set(v.levels.map(l => l.rank))
  if (ranks.size !== TIER_RANKS.length) {
    ctx.addIssue({ code: 'custom', path: ['levels'], message: 'Every tier, T0 to T4, once' })
    return
  }
  if (new Set(v.levels.map(l => l.name.toLowerCase())).size !== v.levels.length) {
    ctx.addIssue({ code: 'custom', path: ['levels'], message: 'Each tier needs a name of its own' })
  }
  const problem = tierTableProblem(v.levels)
  if (problem) ctx.addIssue({ code: 'custom', path: ['levels'], message: problem })
})
export type TierTableInput = z.infer<typeof TierTableSchema>

/** An assessor's grant of tier `rank`: the day signed (default the club's today) and notes. */
export const TierGrantSchema = z.object({
  rank,
  signedOn: isoDate.optional(),
  notes: z.string().trim().max(2000, 'At most 2000 characters').optional(),
}).strict()
export type TierGrantInput = z.infer<typeof TierGrantSchema>

/** A renewal (re-sign-off) of a held tier: optional notes; it is dated the club's today. */
export const TierRenewalSchema = z.object({
  notes: z.string().trim().max(2000, 'At most 2000 characters').optional(),
}).strict()
export type TierRenewalInput = z.infer<typeof TierRenewalSchema>

/** Why the safety officer suspends, reinstates or revokes a tier (kept in the audit trail). */
export const TierActionReasonSchema = z.object({
  reason: z.string().trim().min(1, 'Give the reason').max(500, 'At most 500 characters'),
}).strict()
export type TierActionReason = z.infer<typeof TierActionReasonSchema>

/** `/api/members/:id/tiers/:rank/…`: the member and the tier's rank. */
export const MemberTierParamSchema = z.object({
  id: z.string().uuid('Not a valid id').transform(id => id.toLowerCase()),
  rank: z.coerce.number().int().min(0).max(4),
})

/** The tier holdings export: the whole club's, or one member's. */
export const TierHoldingsQuerySchema = z.object({
  membershipId: z.string().uuid('Not a valid member').transform(id => id.toLowerCase()).optional(),
})
export type TierHoldingsQuery = z.infer<typeof TierHoldingsQuerySchema>
