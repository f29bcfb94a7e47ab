import { IdParamSchema } from '../../../shared/schemas/common'
import { MemberEditSchema } from '../../../shared/schemas/member'
import { editMember } from '../../services/member-actions'

/** Edits a member's details (members.manage); the audit event keeps before/after of changed fields. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.manage')
  const { id } = validParams(event, IdParamSchema)
  const edit = await validBody(event, MemberEditSchema)
  return editMember(actor, id, edit).catch(mapDbError)
})
