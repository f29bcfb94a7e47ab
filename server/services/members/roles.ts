import { normaliseRoles, type Role } from '#shared/utils/permissions'
import type { MemberDto } from '#shared/types/members'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { lockForAction, reload } from './action-guards'

/**
 * Sets membership `id`'s roles ('member' is always kept) with an audit event holding the roles
 * before and after and the reason. Nobody changes their own roles (422 OWN_ROLES, checked on the
 * locked row). Roles bite on the member's next request, because requireMember reads them from the
 * database every time.
 */
export async function assignRoles(actor: Actor, id: string, roles: Role[], reason: string): Promise<MemberDto> {
  const next = normaliseRoles(roles)
  await inTransaction(async (transaction) => {
    const m = await lockForAction(actor, id, 'roles.assign', transaction)
    if (m.id === actor.membership.id) {
      refuse({ code: 'OWN_ROLES', message: 'You cannot change your own roles; another admin has to do it.' })
    }
    const current = normaliseRoles(m.roles)
    if (current.join() === next.join()) return
    await m.update({ roles: next }, { transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'member.roles',
      subjectType: 'membership',
      subjectId: m.id,
      before: { roles: current },
      after: { roles: next },
      reason,
    }, transaction)
  })
  return reload(actor, id)
}
