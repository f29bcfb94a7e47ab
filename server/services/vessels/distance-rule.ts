import type { H3Event } from 'h3'
import type { DistanceRule } from '#shared/utils/vessel-arithmetic'

/** The form of ASME PCC-2's minimum distance every club starts with: R = 20·TNT^⅓ (the 2008 edition). */
export const DEFAULT_DISTANCE_RULE: DistanceRule = 'tnt'

/**
 * The distance rule club `clubId` has chosen, or the starting rule for a visitor (no club). The club's
 * vessel policy is where a club will keep its choice; until it exists every club has the starting rule.
 */
function clubDistanceRule(_clubId: string | null): DistanceRule {
  return DEFAULT_DISTANCE_RULE
}

/**
 * The distance rule a calculation uses when the request names none: the signed-in member's club's
 * setting, or the starting rule for a visitor. The session is read if the request carries one, never
 * required (the calculation is public), and only its club id is used.
 */
export async function defaultDistanceRule(event: H3Event): Promise<DistanceRule> {
  const { user } = await getUserSession(event)
  return clubDistanceRule(user?.clubId ?? null)
}
