import { QueryTypes, type Transaction } from 'sequelize'
import { TZDate } from '@date-fns/tz'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { clubBaseUrl } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import type { SessionCreate } from '#shared/schemas/training'
import type { SessionParticipantDto, SessionPlaceDto, TrainingSessionDetailDto, TrainingSessionDto } from '#shared/types/training'
import { MEMBERSHIP_STATUS_WORDS, type MembershipStatus } from '#shared/utils/membership-status'
import { dateInZone } from '#shared/utils/dates'

/** The statuses that may enrol: active, and grace (dues lately run out: can still train). */
export const STATUSES_THAT_TRAIN: readonly MembershipStatus[] = ['active', 'grace']

/**
 * The instant of wall-clock time `local` (YYYY-MM-DDTHH:mm) in IANA zone `timeZone`, summer time
 * included (a time the clocks skip is read as the same time after the jump).
 */
export function zonedInstant(local: string, timeZone: string): Date {
  const [date, time] = local.split('T') as [string, string]
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const [h, min] = time.split(':').map(Number) as [number, number]
  return new Date(new TZDate(y, m - 1, d, h, min, timeZone).getTime())
}

interface SessionRow {
  id: string
  course_id: string
  course_code: string
  course_name: string
  pass_mark_percent: number | null
  practical_required: boolean
  instructor_membership_id: string
  instructor_name: string
  starts_at: Date
  ends_at: Date
  place: string
  capacity: number
  issued_at: Date | null
  enrolled_count: string
  waiting_count: string
  my_status: 'enrolled' | 'waiting' | null
  my_position: string | null
}

// The caller's live place and, when waiting, how many waiting rows arrived before theirs (plus one).
const SESSION_SELECT = `
  SELECT s.id, s.course_id, c.code AS course_code, c.name AS course_name, c.pass_mark_percent, c.practical_required,
         s.instructor_membership_id, iu.name AS instructor_name, s.starts_at, s.ends_at, s.place, s.capacity, s.issued_at,
         (SELECT count(*) FROM training_enrolments e WHERE e.session_id = s.id AND e.status = 'enrolled') AS enrolled_count,
         (SELECT count(*) FROM training_enrolments e WHERE e.session_id = s.id AND e.status = 'waiting') AS waiting_count,
         mine.status AS my_status,
         CASE WHEN mine.status = 'waiting' THEN (SELECT count(*) FROM training_enrolments w
           WHERE w.session_id = s.id AND w.status = 'waiting' AND w.arrival <= mine.arrival) END AS my_position
    FROM training_sessions s
    JOIN courses c ON c.id = s.course_id
    JOIN memberships im ON im.id = s.instructor_membership_id JOIN users iu ON iu.id = im.user_id
    LEFT JOIN training_enrolments mine ON mine.session_id = s.id AND mine.membership_id = :me AND mine.status <> 'withdrawn'`

function toSessionDto(r: SessionRow): TrainingSessionDto {
  return {
    id: r.id,
    course: { id: r.course_id, code: r.course_code, name: r.course_name, passMarkPercent: r.pass_mark_percent, practicalRequired: r.practical_required },
    instructorMembershipId: r.instructor_membership_id,
    instructorName: r.instructor_name,
    startsAt: new Date(r.starts_at).toISOString(),
    endsAt: new Date(r.ends_at).toISOString(),
    place: r.place,
    capacity: r.capacity,
    enrolledCount: Number(r.enrolled_count),
    waitingCount: Number(r.waiting_count),
    issuedAt: r.issued_at ? new Date(r.issued_at).toISOString() : null,
    mine: r.my_status ? { status: r.my_status, position: r.my_position === null ? null : Number(r.my_position) } : null,
  }
}

/**
 * The sessions of the actor's club: those not yet over (`upcoming`, soonest first) or those that ended
 * in the last 90 days (`past`, latest first), at most 100, each with the actor's own place.
 */
export async function listSessions(actor: Actor, when: 'upcoming' | 'past'): Promise<TrainingSessionDto[]> {
  const rows = await useDb().query<SessionRow>(`${SESSION_SELECT}
    WHERE s.club_id = :clubId AND ${when === 'upcoming' ? 's.ends_at >= now()' : `s.ends_at < now() AND s.ends_at >= now() - interval '90 days'`}
    ORDER BY s.starts_at ${when === 'upcoming' ? 'ASC' : 'DESC'}, s.id LIMIT 100`,
  { replacements: { clubId: actor.club.id, me: actor.membership.id }, type: QueryTypes.SELECT })
  return rows.map(toSessionDto)
}

/**
 * Session `id` of the actor's club with its trainees (enrolled, then the waiting list in arrival
 * order) for holders of training.run; everyone else sees the counts and their own place. Null: none.
 */
export async function sessionDetail(actor: Actor, id: string): Promise<TrainingSessionDetailDto | null> {
  const [row] = await useDb().query<SessionRow>(`${SESSION_SELECT} WHERE s.club_id = :clubId AND s.id = :id`,
    { replacements: { clubId: actor.club.id, me: actor.membership.id, id }, type: QueryTypes.SELECT })
  if (!row) return null
  const participants = actorCan(actor, 'training.run') ? await sessionParticipants(id) : null
  return { ...toSessionDto(row), participants, timeZone: actor.club.timeZone }
}

async function sessionParticipants(sessionId: string): Promise<SessionParticipantDto[]> {
  const rows = await useDb().query<{ id: string, membership_id: string, name: string, status: 'enrolled' | 'waiting', position: string, attended: boolean | null, theory_score_percent: number | null, practical_signed_off: boolean | null, record_id: string | null, result: 'pass' | 'fail' | null }>(
    `SELECT e.id, e.membership_id, u.name, e.status, e.attended, e.theory_score_percent, e.practical_signed_off, e.record_id, r.result,
            row_number() OVER (PARTITION BY e.status ORDER BY e.arrival) AS position
       FROM training_enrolments e JOIN memberships m ON m.id = e.membership_id JOIN users u ON u.id = m.user_id
       LEFT JOIN training_records r ON r.id = e.record_id
      WHERE e.session_id = :sessionId AND e.status <> 'withdrawn'
      ORDER BY e.status, e.arrival`,
    { replacements: { sessionId }, type: QueryTypes.SELECT })
  return rows.map(r => ({
    enrolmentId: r.id, membershipId: r.membership_id, name: r.name, status: r.status,
    position: r.status === 'waiting' ? Number(r.position) : null,
    attended: r.attended, theoryScorePercent: r.theory_score_percent, practicalSignedOff: r.practical_signed_off,
    recordId: r.record_id, result: r.result,
  }))
}

/**
 * An instructor (training.run) schedules a session of a course of their club, times read on the club's
 * wall clock; one that would already be over is refused. Audited. Returns the new session.
 */
export async function scheduleSession(actor: Actor, input: SessionCreate, now = new Date()): Promise<TrainingSessionDetailDto> {
  const startsAt = zonedInstant(input.startsAt, actor.club.timeZone)
  const endsAt = zonedInstant(input.endsAt, actor.club.timeZone)
  if (endsAt <= startsAt) refuse({ code: 'ENDS_BEFORE_START', message: 'The session ends after it starts.' })
  if (endsAt <= now) refuse({ code: 'SESSION_IN_PAST', message: 'That session would already be over; schedule one still to come.' })
  const id = await inTransaction(async (transaction) => {
    const [course] = await useDb().query<{ id: string }>('SELECT id FROM courses WHERE id = :id AND club_id = :clubId',
      { replacements: { id: input.courseId, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
    if (!course) refuse({ code: 'NO_SUCH_COURSE', message: 'The club has no such course.' })
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO training_sessions (club_id, course_id, instructor_membership_id, starts_at, ends_at, place, capacity)
       VALUES (:clubId, :courseId, :instructor, :startsAt, :endsAt, :place, :capacity) RETURNING id`,
      { replacements: { clubId: actor.club.id, courseId: input.courseId, instructor: actor.membership.id, startsAt, endsAt, place: input.place, capacity: input.capacity }, type: QueryTypes.SELECT, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'training.session', subjectType: 'training_session', subjectId: row!.id,
      after: { courseId: input.courseId, startsAt: startsAt.toISOString(), endsAt: endsAt.toISOString(), place: input.place, capacity: input.capacity },
    }, transaction)
    return row!.id
  })
  return (await sessionDetail(actor, id))!
}

/** 422 with the reason when the actor's membership status (the one status function's) may not train. */
function checkMayTrain(actor: Actor) {
  if (STATUSES_THAT_TRAIN.includes(actor.status)) return
  refuse({ code: `MEMBERSHIP_${actor.status.toUpperCase()}`, message: `Your membership is ${MEMBERSHIP_STATUS_WORDS[actor.status].label.toLowerCase()}: ${MEMBERSHIP_STATUS_WORDS[actor.status].meaning} Only active members and members in their grace period enrol.` })
}

/** The place of the enrolment that arrived as `arrival` in session `sessionId`. */
async function placeOf(sessionId: string, arrival: string, status: 'enrolled' | 'waiting', transaction: Transaction): Promise<SessionPlaceDto> {
  if (status === 'enrolled') return { status, position: null }
  const [row] = await useDb().query<{ n: string }>(
    `SELECT count(*) AS n FROM training_enrolments WHERE session_id = :sessionId AND status = 'waiting' AND arrival <= :arrival`,
    { replacements: { sessionId, arrival }, type: QueryTypes.SELECT, transaction })
  return { status, position: Number(row!.n) }
}

/**
 * The actor enrols in session `id`: a place while there is one, else the end of the waiting list.
 * Taken under the session's row lock (lockTrainingSession), so simultaneous enrolments never overfill
 * it and take places in the order they got the lock (their `arrival`). Active and grace members only
 * (422 with the reason otherwise); not the session's own instructor; not once it has started.
 */
export async function enrol(actor: Actor, id: string, now = new Date()): Promise<SessionPlaceDto> {
  checkMayTrain(actor)
  return inTransaction(async (transaction) => {
    const session = await lockTrainingSession(actor.club.id, id, transaction)
    if (!session) notFound('No such session')
    if (session.issued_at || new Date(session.starts_at) <= now) refuse({ code: 'SESSION_STARTED', message: 'This session has started; enrolment is closed.' })
    if (session.instructor_membership_id === actor.membership.id) refuse({ code: 'OWN_SESSION', message: 'You run this session; an instructor does not train themselves.' })
    const [taken] = await useDb().query<{ n: string }>(
      `SELECT count(*) AS n FROM training_enrolments WHERE session_id = :id AND status = 'enrolled'`,
      { replacements: { id }, type: QueryTypes.SELECT, transaction })
    const status = Number(taken!.n) < session.capacity ? 'enrolled' : 'waiting'
    const [row] = await useDb().query<{ arrival: string }>(
      `INSERT INTO training_enrolments (club_id, session_id, membership_id, status)
       VALUES (:clubId, :id, :me, :status) ON CONFLICT (session_id, membership_id) WHERE status <> 'withdrawn' DO NOTHING
       RETURNING arrival::text AS arrival`,
      { replacements: { clubId: actor.club.id, id, me: actor.membership.id, status }, type: QueryTypes.SELECT, transaction })
    if (!row) conflict('You are already enrolled in this session or on its waiting list.')
    return placeOf(id, row.arrival, status, transaction)
  })
}

/**
 * The actor withdraws from session `id` (before it starts). When they held a place, the first member
 * on the waiting list moves up in the same transaction and is e-mailed (`training_moved_up`, which
 * they may switch off). 404 when they have no place in it.
 */
export async function withdraw(actor: Actor, id: string, now = new Date()): Promise<{ movedUp: boolean }> {
  const movedUp = await inTransaction(async (transaction) => {
    const session = await lockTrainingSession(actor.club.id, id, transaction)
    if (!session) notFound('No such session')
    if (session.issued_at || new Date(session.starts_at) <= now) refuse({ code: 'SESSION_STARTED', message: 'This session has started; you can no longer withdraw.' })
    const [mine] = await useDb().query<{ id: string, status: 'enrolled' | 'waiting' }>(
      `WITH old AS (SELECT id, status FROM training_enrolments WHERE session_id = :id AND membership_id = :me AND status <> 'withdrawn')
       UPDATE training_enrolments e SET status = 'withdrawn', withdrawn_at = now() FROM old WHERE e.id = old.id
       RETURNING e.id, old.status`,
      { replacements: { id, me: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    if (!mine) notFound('You have no place in this session')
    return mine.status === 'enrolled' ? moveUpFirstWaiting(actor, id, transaction) : false
  })
  if (movedUp) kickNoticeQueue()
  return { movedUp }
}

/** Gives the first waiting member of session `id` the freed place and queues their e-mail; false when nobody waits. */
async function moveUpFirstWaiting(actor: Actor, id: string, transaction: Transaction): Promise<boolean> {
  const [next] = await useDb().query<{ id: string, membership_id: string, email: string, name: string, opt_outs: string[], course_name: string, course_code: string, starts_at: Date, place: string }>(
    `UPDATE training_enrolments e SET status = 'enrolled', moved_up_at = now()
      WHERE e.id = (SELECT id FROM training_enrolments WHERE session_id = :id AND status = 'waiting' ORDER BY arrival LIMIT 1)
      RETURNING e.id, e.membership_id,
        (SELECT u.email FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = e.membership_id) AS email,
        (SELECT u.name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = e.membership_id) AS name,
        (SELECT m.notice_opt_outs FROM memberships m WHERE m.id = e.membership_id) AS opt_outs,
        (SELECT c.name FROM training_sessions s JOIN courses c ON c.id = s.course_id WHERE s.id = e.session_id) AS course_name,
        (SELECT c.code FROM training_sessions s JOIN courses c ON c.id = s.course_id WHERE s.id = e.session_id) AS course_code,
        (SELECT s.starts_at FROM training_sessions s WHERE s.id = e.session_id) AS starts_at,
        (SELECT s.place FROM training_sessions s WHERE s.id = e.session_id) AS place`,
    { replacements: { id }, type: QueryTypes.SELECT, transaction })
  if (!next) return false
  const startsAt = new Date(next.starts_at)
  await enqueueNotice({
    clubId: actor.club.id,
    membershipId: next.membership_id,
    kind: 'training_moved_up',
    subjectKey: next.id,
    dueOn: dateInZone(new Date(), actor.club.timeZone),
    toEmail: next.email,
    optOuts: next.opt_outs,
    vars: {
      clubName: actor.club.name, memberName: next.name, baseUrl: clubBaseUrl(actor.club), courseName: next.course_name, courseCode: next.course_code,
      startsAt: new Intl.DateTimeFormat('en-GB', { dateStyle: 'full', timeStyle: 'short', timeZone: actor.club.timeZone }).format(startsAt),
      place: next.place, sessionId: id,
    },
  }, transaction)
  return true
}
