import { TierHoldingsQuerySchema } from '#shared/schemas/tiers'
import { tierHoldingsExport } from '../../services/club-data'

/** Every tier the club's members hold or held (or one member's), with its state today, as a CSV download (members.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { membershipId } = validQuery(event, TierHoldingsQuerySchema)
  const { header, rows } = await tierHoldingsExport(actor, membershipId)
  return sendCsv(event, 'tiers.csv', header, rows)
})
