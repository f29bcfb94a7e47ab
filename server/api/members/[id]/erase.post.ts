import { IdParamSchema } from '#shared/schemas/common'
import { EraseMemberSchema } from '#shared/schemas/erasure'
import { eraseMember } from '../../../services/club-data'

/**
 * Erases a member on their request (members.manage): the member's name typed again and a reason.
 * 404 for a member of another club; 422 for one's own, one already erased or a name that does not match.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, EraseMemberSchema)
  return eraseMember(actor, id, input, await uploadsDir())
})
