import { IdParamSchema } from '#shared/schemas/common'
import { RolesSchema } from '#shared/schemas/member'
import { assignRoles } from '../../../services/members'

/** Sets a member's roles (roles.assign) with a reason; 'member' is always kept; never your own (422). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'roles.assign')
  const { id } = validParams(event, IdParamSchema)
  const { roles, reason } = await validBody(event, RolesSchema)
  return assignRoles(actor, id, roles, reason).catch(mapDbError)
})
