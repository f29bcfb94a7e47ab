import { IdParamSchema } from '#shared/schemas/common'
import { MemberEditSchema } from '#shared/schemas/member'
import { editMember } from '../../services/members'

/** Edits a member's details (members.manage); the audit event keeps before/after of changed fields (429 when a new guardian e-mail has had its e-mails for the day). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const edit = await validBody(event, MemberEditSchema)
  return withRetryAfter(event, () => editMember(actor, id, edit).catch(mapDbError))
})
