import { deskCounts } from '../../../services/audit'

/** The audit desk's counts (audit.read): one figure per table, the expiring ones within 30, 60 and 90 days. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  return deskCounts(actor)
})
