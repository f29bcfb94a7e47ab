import type { DistanceRule } from '#shared/utils/vessel-arithmetic'

/** The form of ASME PCC-2's minimum distance every club starts with: R = 20·TNT^⅓ (the 2008 edition). */
export const DEFAULT_DISTANCE_RULE: DistanceRule = 'tnt'

/**
 * The distance rule club `clubId` has chosen, or the starting rule for a visitor (null: no club). The
 * club's vessel policy is where a club will keep its choice; until it exists every club has the
 * starting rule. Async already, because that choice will be read from the database.
 */
export async function clubDistanceRule(_clubId: string | null): Promise<DistanceRule> {
  return DEFAULT_DISTANCE_RULE
}
