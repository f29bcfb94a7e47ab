import { MemberDirectoryQuerySchema } from '#shared/schemas/member'
import { membersExport } from '../../services/club-data'

/** The member directory with its filters and sort, every page, as a CSV download (members.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { header, rows } = await membersExport(actor.club, validQuery(event, MemberDirectoryQuerySchema))
  return sendCsv(event, 'members.csv', header, rows)
})
