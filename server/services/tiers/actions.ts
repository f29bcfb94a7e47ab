import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockMemberships } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import { tierCode, tierState, type TierRank } from '#shared/utils/tier-rules'
import type { MemberTiersDto } from '#shared/types/tiers'
import { heldTierRows, memberTierStanding, toHeldTier, type HeldTierRow } from './held'
import { heldOr404 } from './signoffs'
import { loadTierLevel } from './levels'

type TierAction = 'suspend' | 'reinstate' | 'revoke'

/** Queues the member's e-mail about their tier `rank` being suspended or reinstated (a safety kind). */
async function queueTierNotice(actor: Actor, membershipId: string, held: HeldTierRow, kind: 'tier_suspended' | 'tier_reinstated', reason: string, transaction: Transaction) {
  const [user] = await useDb().query<{ email: string, name: string }>(
    'SELECT u.email, u.name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = :membershipId',
    { replacements: { membershipId }, type: QueryTypes.SELECT, transaction })
  const level = await loadTierLevel(actor.club.id, held.rank, transaction)
  await enqueueNotice({
    clubId: actor.club.id,
    membershipId,
    kind,
    subjectKey: `${held.id}:${new Date().toISOString()}`,
    dueOn: clubToday(actor.club),
    toEmail: user!.email,
    vars: {
      clubName: actor.club.name, memberName: user!.name, baseUrl: clubBaseUrl(actor.club),
      tierCode: tierCode(held.rank), tierName: level?.name ?? tierCode(held.rank), expiresOn: held.expires_on, reason,
    },
  }, transaction)
}

/**
 * The safety officer suspends (until reinstated), reinstates or revokes member `membershipId`'s tier
 * `rank` (tiers.suspend), with the reason in the audit trail. A suspension or reinstatement e-mails
 * the member. The member falls back to the highest tier still valid; the answer is their standing.
 * `also` runs in the same transaction after the change (the incident page records its own step there).
 */
export async function changeTier(actor: Actor, membershipId: string, rank: TierRank, action: TierAction, reason: string, also?: (transaction: Transaction) => Promise<void>): Promise<MemberTiersDto> {
  const clubId = actor.club.id
  const today = clubToday(actor.club)
  await inTransaction(async (transaction) => {
    const rows = await lockMemberships([membershipId], transaction, clubId)
    if (!rows.size) notFound('No such member')
    const held = heldOr404(await heldTierRows(membershipId, transaction), rank)
    const t = toHeldTier(held)
    const before = { rank, tierState: tierState(t, today) }
    if (t.revoked) refuse({ code: 'TIER_REVOKED', message: `${tierCode(rank)} was revoked: only a new grant restores it.` })
    if (action === 'suspend' && t.suspended) refuse({ code: 'TIER_ALREADY_SUSPENDED', message: `${tierCode(rank)} is already suspended.` })
    if (action === 'reinstate' && !t.suspended) refuse({ code: 'TIER_NOT_SUSPENDED', message: `${tierCode(rank)} is not suspended.` })
    const set = {
      suspend: 'suspended_at = now(), suspension_reason = :reason, suspended_by_membership_id = :me',
      reinstate: 'suspended_at = NULL, suspension_reason = NULL, suspended_by_membership_id = NULL',
      revoke: 'revoked_at = now(), revocation_reason = :reason, revoked_by_membership_id = :me',
    }[action]
    await useDb().query(`UPDATE member_tiers SET ${set}, updated_at = now() WHERE id = :id`,
      { replacements: { id: held.id, reason, me: actor.membership.id }, transaction })
    const after = toHeldTier((await heldTierRows(membershipId, transaction)).find(r => r.rank === rank)!)
    await recordAudit(actor, clubId, {
      action: `tier.${action}`, subjectType: 'membership', subjectId: membershipId,
      before, after: { rank, tierState: tierState(after, today) }, reason,
    }, transaction)
    if (action !== 'revoke') await queueTierNotice(actor, membershipId, held, action === 'suspend' ? 'tier_suspended' : 'tier_reinstated', reason, transaction)
    if (also) await also(transaction)
  })
  kickNoticeQueue()
  return (await memberTierStanding(clubId, membershipId, today))!
}
