import { OptOutSchema } from '#shared/schemas/notice'
import { applyOptOut } from '../../services/notices'

/**
 * Opts a member out of one optional kind from a signed link, without signing in. The token comes in
 * the JSON body (the opt-out page) or, for mail programs' one-click POST (RFC 8058), in the query.
 * 404 for a forged or altered link, 422 NOT_OPTIONAL for safety kinds; idempotent.
 */
export default defineEventHandler(async (event) => {
  const { token } = getQuery(event).token !== undefined ? validQuery(event, OptOutSchema) : await validBody(event, OptOutSchema)
  return applyOptOut(token)
})
