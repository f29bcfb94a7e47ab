import { TierTableSchema } from '#shared/schemas/tiers'
import { updateTierTable } from '../../services/tiers'

/** The safety officer saves the whole tier table and the junior cap (policy.edit); audited with before and after. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'policy.edit')
  const input = await validBody(event, TierTableSchema)
  return updateTierTable(actor, input)
})
