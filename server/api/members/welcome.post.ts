import { WelcomeSendSchema } from '#shared/schemas/imported'
import { sendWelcomes } from '../../services/accounts'

/** The admin sends the welcome: one e-mail with a password link per imported member not welcomed yet; idempotent. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  await validBody(event, WelcomeSendSchema)
  return sendWelcomes(actor)
})
