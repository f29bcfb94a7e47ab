import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockMemberships } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import type { WelcomeSentDto } from '#shared/types/imported'
import { linkFor, lockAccount } from './accounts'
import { issueToken, WELCOME_LINK_HOURS } from './tokens'

// The welcome of imported members. A roster import creates accounts without a password and sends
// nothing; the admin chooses when the club's first e-mail goes out. "Not welcomed yet" is the
// notices table itself: a member with a welcome notice in any state is never sent another.

/** Members of club `clubId` (not resigned) whose account has no password and who have no welcome notice. */
const WAITING_SQL = `
  FROM memberships m JOIN users u ON u.id = m.user_id
 WHERE m.club_id = :clubId AND m.resigned_at IS NULL AND u.password_hash IS NULL
   AND NOT EXISTS (SELECT 1 FROM notices n WHERE n.membership_id = m.id AND n.kind = 'welcome')`

/** How many imported members of the actor's club still wait for their welcome. */
export async function welcomesWaiting(actor: Actor): Promise<number> {
  const [row] = await useDb().query<{ n: number }>(`SELECT count(*)::int AS n ${WAITING_SQL}`,
    { replacements: { clubId: actor.club.id }, type: QueryTypes.SELECT })
  return row?.n ?? 0
}

/**
 * Queues one member's welcome with a fresh one-time link, under their membership and account locks
 * (lock order steps 1–2), after checking again that they still have no password and no welcome: two
 * presses at once queue it once. True when queued.
 */
async function welcomeOne(actor: Actor, membershipId: string, transaction: Transaction): Promise<boolean> {
  const member = (await lockMemberships([membershipId], transaction, actor.club.id)).get(membershipId)
  if (!member || member.resignedAt) return false
  const user = await lockAccount(member.userId, transaction)
  const [still] = await useDb().query<{ id: string }>(`SELECT m.id ${WAITING_SQL} AND m.id = :membershipId`,
    { replacements: { clubId: actor.club.id, membershipId }, type: QueryTypes.SELECT, transaction })
  if (!still) return false
  const issued = await issueToken({ userId: user.id, membershipId, purpose: 'reset_password', hours: WELCOME_LINK_HOURS }, transaction)
  return enqueueNotice({
    clubId: actor.club.id,
    membershipId,
    kind: 'welcome',
    // One welcome per member: the subject is the membership, whatever day it is sent.
    subjectKey: membershipId,
    dueOn: clubToday(actor.club),
    toEmail: user.email,
    vars: { clubName: actor.club.name, memberName: user.name, baseUrl: clubBaseUrl(actor.club), actionUrl: linkFor(actor.club, '/reset-password', issued.token) },
  }, transaction)
}

/**
 * The admin's "send the welcome" (members.manage): queues, through the notice queue, one welcome
 * e-mail with a link to choose a password to every imported member of the club who has no password
 * and has not been welcomed yet; pressing again sends nothing twice. One transaction per member
 * (a big import does not hold one long transaction), then one audit event with the count.
 */
export async function sendWelcomes(actor: Actor): Promise<WelcomeSentDto> {
  const ids = await useDb().query<{ id: string }>(`SELECT m.id ${WAITING_SQL} ORDER BY m.id`,
    { replacements: { clubId: actor.club.id }, type: QueryTypes.SELECT })
  let queued = 0
  for (const { id } of ids) {
    if (await inTransaction(transaction => welcomeOne(actor, id, transaction))) queued++
  }
  if (queued) {
    await recordAudit(actor, actor.club.id, {
      action: 'member.welcome', subjectType: 'club', subjectId: actor.club.id, after: { welcomesQueued: queued },
    })
    kickNoticeQueue()
  }
  return { queued, waiting: await welcomesWaiting(actor) }
}
