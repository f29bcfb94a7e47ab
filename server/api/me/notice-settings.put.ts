import { NoticeSettingsSchema } from '#shared/schemas/notice'
import { saveNoticeSettings } from '../../services/notices'

/** Sets which optional e-mails the signed-in member has switched off. 422 for a safety kind. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { optOuts } = await validBody(event, NoticeSettingsSchema)
  return saveNoticeSettings(actor.membership.id, optOuts)
})
