import { noticeSettings } from '../../services/notices'

/** The signed-in member's optional e-mails, each on or off. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return noticeSettings(actor.membership.id)
})
