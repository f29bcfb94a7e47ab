import { OutboxQuerySchema } from '#shared/schemas/notice'
import { listOutbox } from '../../services/notices'

/** The outbox: the club's notices, newest first, paged and filtered by status and kind. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'notices.manage')
  const query = validQuery(event, OutboxQuerySchema)
  return listOutbox(actor.club, query)
})
