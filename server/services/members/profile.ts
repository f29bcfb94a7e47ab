import { Membership, User } from '../../models'
import type { Profile } from '#shared/schemas/member'
import type { MemberDto } from '#shared/types/members'
import type { Actor } from '../../utils/auth'
import { changedFields, recordAudit } from '../audit'
import { loadMemberDto } from './members'

/**
 * The member's own profile edit: name (on the account) and contact details (on the membership),
 * in one transaction that locks the membership row, then the account's (as a member edit does).
 * Contact details are the member's own and not audited; a new name is ("Changed a name", without
 * either name): taking another officer's name is how one would pass one's acts off as theirs.
 * Fields left out are kept; fields sent empty are cleared.
 */
export async function updateProfile(actor: Actor, profile: Profile): Promise<MemberDto | null> {
  const { name, ...contact } = profile
  const changes = Object.fromEntries(Object.entries(contact).filter(([, v]) => v !== undefined))
  await inTransaction(async (transaction) => {
    // The one lock order (utils/locks.ts): the membership row, then the account's.
    await lockMemberships([actor.membership.id], transaction, actor.club.id)
    const user = await lockUser(actor.user.id, transaction)
    if (user && user.name !== name) {
      await User.update({ name }, { where: { id: actor.user.id }, transaction })
      await recordAudit(actor, actor.club.id, {
        action: 'member.rename', subjectType: 'membership', subjectId: actor.membership.id, after: changedFields(['name']),
      }, transaction)
    }
    if (Object.keys(changes).length) {
      await Membership.update(changes, { where: { id: actor.membership.id, clubId: actor.club.id }, transaction })
    }
  })
  return loadMemberDto(actor.club.id, actor.membership.id)
}
