import { waiverHistory } from '../../services/waivers'

/** Every waiver version, newest first, with acceptance counts (policy.edit). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'policy.edit')
  return waiverHistory(actor.club.id)
})
