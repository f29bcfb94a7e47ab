import { currentWaiver } from '../../services/waivers'
import { waiverStanding } from '../../services/members'
import type { CurrentWaiverDto } from '#shared/types/waivers'

/** The waiver in force (null when none is published) and whether I have accepted it. */
export default defineEventHandler(async (event): Promise<CurrentWaiverDto> => {
  const actor = await requireMember(event)
  const [waiver, standing] = await Promise.all([currentWaiver(actor.club.id), waiverStanding(actor.club.id, actor.membership.id)])
  return { waiver, standing }
})
