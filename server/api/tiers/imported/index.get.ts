import { unconfirmedTiers } from '../../../services/tiers'

/** The unconfirmed tiers a roster import brought in, each with why the caller may not confirm it (or null). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.grant')
  return unconfirmedTiers(actor)
})
