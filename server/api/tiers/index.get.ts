import { loadTierTable } from '../../services/tiers'

/** The club's tier table and junior cap: every member reads it. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return loadTierTable(actor.club.id)
})
