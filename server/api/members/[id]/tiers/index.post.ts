import { IdParamSchema } from '#shared/schemas/common'
import { TierGrantSchema } from '#shared/schemas/tiers'
import { grantTier } from '../../../../services/tiers'

/**
 * An assessor grants the member a tier (tiers.grant): 201 with the sign-off; 422 with SELF_SIGN_OFF or
 * ASSESSOR_NOT_QUALIFIED, or with every prerequisite still missing.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.grant')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, TierGrantSchema)
  const signoff = await grantTier(actor, id, input)
  setResponseStatus(event, 201)
  return signoff
})
