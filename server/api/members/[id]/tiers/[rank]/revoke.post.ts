import { MemberTierParamSchema, TierActionReasonSchema } from '#shared/schemas/tiers'
import type { TierRank } from '#shared/utils/tier-rules'
import { changeTier } from '../../../../../services/tiers'

/** The safety officer revokes a held tier (only a new grant restores it) (tiers.suspend), with a reason; answers the member's tiers after the fall-back. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.suspend')
  const { id, rank } = validParams(event, MemberTierParamSchema)
  const { reason } = await validBody(event, TierActionReasonSchema)
  return changeTier(actor, id, rank as TierRank, 'revoke', reason)
})
