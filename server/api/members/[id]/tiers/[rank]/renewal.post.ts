import { MemberTierParamSchema, TierRenewalSchema } from '#shared/schemas/tiers'
import type { TierRank } from '#shared/utils/tier-rules'
import { renewTier } from '../../../../../services/tiers'

/** An assessor re-signs a held tier (tiers.grant): 201 with the sign-off; 422 with what the renewal still needs. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.grant')
  const { id, rank } = validParams(event, MemberTierParamSchema)
  const input = await validBody(event, TierRenewalSchema)
  const signoff = await renewTier(actor, id, rank as TierRank, input)
  setResponseStatus(event, 201)
  return signoff
})
