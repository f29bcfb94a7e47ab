import { AuditQuerySchema } from '#shared/schemas/audit'
import { listAuditEvents } from '../../services/audit'

/** The audit trail (audit.read): paged, newest first, filtered by action and subject. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  const query = validQuery(event, AuditQuerySchema)
  return listAuditEvents(actor.club.id, query)
})
