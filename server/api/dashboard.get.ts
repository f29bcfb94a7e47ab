import { loadDashboard } from '../services/dashboard'

/** The dashboard cards for the signed-in member: their own, then those their capabilities open. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return (await loadDashboard(actor)) ?? notFound()
})
