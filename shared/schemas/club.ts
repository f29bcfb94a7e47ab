import { z } from 'zod'

/**
 * The club's policy document (clubs.policy, JSONB), validated on the way in and read with defaults.
 * Later issues add their settings here (tiers, proof margin, standoff rule …).
 */
export const ClubPolicySchema = z.object({
  /** The highest pressure tier a junior (under 18) may hold. */
  juniorTierCap: z.enum(['T0', 'T1', 'T2']).default('T1'),
}).passthrough()
export type ClubPolicy = z.infer<typeof ClubPolicySchema>
