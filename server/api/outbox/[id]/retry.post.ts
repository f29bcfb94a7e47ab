import { IdParamSchema } from '#shared/schemas/common'
import { retryNotice } from '../../../services/notices'

/** Puts a failed (or skipped) notice back in the queue, due now. 409 once it has been sent. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'notices.manage')
  const { id } = validParams(event, IdParamSchema)
  return retryNotice(actor, id)
})
