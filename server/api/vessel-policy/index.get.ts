import { vesselPolicy } from '../../services/vessels'

/** The club's vessel policy: every member may read the rules their vessels are held to. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return vesselPolicy(actor.club.id)
})
