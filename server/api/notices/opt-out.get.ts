import { OptOutSchema } from '#shared/schemas/notice'
import { previewOptOut } from '../../services/notices'

/** What an e-mailed opt-out link would switch off (no sign-in). 404 for a forged or altered link. */
export default defineEventHandler(async (event) => {
  const { token } = validQuery(event, OptOutSchema)
  return previewOptOut(token)
})
