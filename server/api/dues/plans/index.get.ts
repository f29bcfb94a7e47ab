import { listPlans } from '../../../services/dues'

/** Every dues plan of the club (any member may read the prices). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return { items: await listPlans(actor.club.id) }
})
