import { QueryTypes } from 'sequelize'
import type { DistanceRule } from '#shared/utils/vessel-arithmetic'

/** The form of ASME PCC-2's minimum distance every club starts with: R = 20·TNT^⅓ (the 2008 edition). */
export const DEFAULT_DISTANCE_RULE: DistanceRule = 'tnt'

/**
 * The distance rule club `clubId` has chosen in its vessel policy, or the starting rule for a visitor
 * (null: no club) and for a club that has not saved a policy.
 */
export async function clubDistanceRule(clubId: string | null): Promise<DistanceRule> {
  if (!clubId) return DEFAULT_DISTANCE_RULE
  const [row] = await useDb().query<{ distance_rule: DistanceRule }>(
    'SELECT distance_rule FROM vessel_policies WHERE club_id = :clubId',
    { replacements: { clubId }, type: QueryTypes.SELECT })
  return row?.distance_rule ?? DEFAULT_DISTANCE_RULE
}
