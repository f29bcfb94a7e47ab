import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { actorCan } from '../../utils/auth'
import { lockLaunchEvent } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubToday } from '../clubs'
import type { LaunchEventDto } from '#shared/types/events'
import { registrationProblem, walkInProblem } from '#shared/utils/event-rules'
import { FILL_REASON_MESSAGES } from '#shared/utils/fill-reasons'
import { launchEventDetail } from './events'

/** The event locked (step 4) and its facts for the registration rules; 404 when not the club's. */
async function lockedEvent(actor: Actor, id: string, transaction: Parameters<typeof lockLaunchEvent>[2]) {
  const row = await lockLaunchEvent(actor.club.id, id, transaction)
  if (!row) notFound('No such event')
  return { heldOn: row.held_on, cancelled: row.cancelled_at !== null }
}

/**
 * The signed-in member registers for event `id`, until the day before it (the club's today); a
 * member who withdrew may register again. Registering twice changes nothing. 422 when closed.
 */
export async function registerForEvent(actor: Actor, id: string, now = new Date()): Promise<LaunchEventDto> {
  await inTransaction(async (transaction) => {
    const problem = registrationProblem(await lockedEvent(actor, id, transaction), clubToday(actor.club, now))
    if (problem) refuse({ code: 'REGISTRATION_CLOSED', message: problem })
    await useDb().query(
      `INSERT INTO launch_event_registrations (event_id, club_id, membership_id) VALUES (:id, :clubId, :memberId)
       ON CONFLICT (event_id, membership_id) DO UPDATE SET withdrawn_at = NULL, registered_at = now(), walk_in = false, added_by_membership_id = NULL
       WHERE launch_event_registrations.withdrawn_at IS NOT NULL`,
      { replacements: { id, clubId: actor.club.id, memberId: actor.membership.id }, transaction })
  })
  return (await launchEventDetail(actor, id, now))!
}

/** The signed-in member withdraws from event `id`, until the day before it. 422 when closed or not registered. */
export async function withdrawFromEvent(actor: Actor, id: string, now = new Date()): Promise<LaunchEventDto> {
  await inTransaction(async (transaction) => {
    const problem = registrationProblem(await lockedEvent(actor, id, transaction), clubToday(actor.club, now))
    if (problem) refuse({ code: 'REGISTRATION_CLOSED', message: problem })
    const rows = await useDb().query<{ event_id: string }>(
      `UPDATE launch_event_registrations SET withdrawn_at = now() WHERE event_id = :id AND membership_id = :memberId AND withdrawn_at IS NULL
       RETURNING event_id`, { replacements: { id, memberId: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    if (!rows.length) refuse({ code: 'NOT_REGISTERED', message: 'You are not registered for this event.' })
  })
  return (await launchEventDetail(actor, id, now))!
}

/**
 * A member of the event's staff (with `fills.record_any`) adds member `membershipId` as a walk-in, on
 * the event's day only (audited). 404 for an event or member not of the club; 422 off the day or
 * when the caller is not on the event's staff.
 */
export async function addWalkIn(actor: Actor, id: string, membershipId: string, now = new Date()): Promise<LaunchEventDto> {
  const clubId = actor.club.id
  await inTransaction(async (transaction) => {
    const facts = await lockedEvent(actor, id, transaction)
    const [staff] = await useDb().query<{ on_staff: boolean, member_ok: boolean }>(
      `SELECT EXISTS (SELECT 1 FROM launch_event_staff WHERE event_id = :id AND membership_id = :actorId) AS on_staff,
              EXISTS (SELECT 1 FROM memberships WHERE id = :membershipId AND club_id = :clubId) AS member_ok`,
      { replacements: { id, actorId: actor.membership.id, membershipId, clubId }, type: QueryTypes.SELECT, transaction })
    if (!staff!.on_staff || !actorCan(actor, 'fills.record_any')) refuse({ code: 'NOT_ON_EVENT_STAFF', message: FILL_REASON_MESSAGES.NOT_ON_EVENT_STAFF })
    const problem = walkInProblem(facts, clubToday(actor.club, now))
    if (problem) refuse({ code: 'WALK_IN_CLOSED', message: problem })
    if (!staff!.member_ok) notFound('No such member')
    await useDb().query(
      `INSERT INTO launch_event_registrations (event_id, club_id, membership_id, walk_in, added_by_membership_id) VALUES (:id, :clubId, :membershipId, true, :by)
       ON CONFLICT (event_id, membership_id) DO UPDATE SET withdrawn_at = NULL, walk_in = true, added_by_membership_id = :by, registered_at = now()
       WHERE launch_event_registrations.withdrawn_at IS NOT NULL`,
      { replacements: { id, clubId, membershipId, by: actor.membership.id }, transaction })
    await recordAudit(actor, clubId, { action: 'event.walk_in', subjectType: 'launch_event', subjectId: id, after: { membershipId } }, transaction)
  })
  return (await launchEventDetail(actor, id, now))!
}
