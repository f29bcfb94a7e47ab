import { MemberDirectoryQuerySchema } from '#shared/schemas/member'
import { listMembers } from '../../services/members'

/** The member directory (members.read): server-side paging, sorting, status/role filters and search. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const query = validQuery(event, MemberDirectoryQuerySchema)
  return listMembers(actor.club, query)
})
