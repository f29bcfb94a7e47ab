import { QueryTypes } from 'sequelize'
import { TZDate } from '@date-fns/tz'
import { addCalendarDays, addCalendarMonths } from '#shared/utils/dates'
import { trainingExpiresOn } from '#shared/utils/training-validity'
import type { SeedContext } from './context'
import { DEMO_TIME_ZONE } from './context'

const MEMBER = 'member@hoopwise.example'
const INSTRUCTOR = 'instructor@hoopwise.example'
const SAFETY = 'safety@hoopwise.example'
const ODILE = 'odile.marshcombe@members.hoopwise.example' // an instructor
const VESNA = 'vesna.fluke@members.hoopwise.example'
const WREN = 'wren.gullyhaven@members.hoopwise.example'
const XANTHE = 'xanthe.kelpford@members.hoopwise.example'
const YESTIN = 'yestin.mudlark@members.hoopwise.example'
const ZILLAH = 'zillah.oysterby@members.hoopwise.example'
const AUBREY = 'aubrey.pebblewick@members.hoopwise.example'

interface DemoSession {
  course: string
  /** The session's day (YYYY-MM-DD) from the seed date. */
  day: (today: string) => string
  instructor: string
  place: string
  capacity: number
  /** Past sessions: trainees, all present and passing, records issued by the instructor. */
  trained?: string[]
  /** The upcoming session: places taken, then the waiting list, in arrival order. */
  enrolled?: string[]
  waiting?: string[]
}

const daysAgo = (n: number) => (today: string) => addCalendarDays(today, -n)

// Past sessions give the demo accounts their records (nobody trains themselves): the demo member is
// current in composite handling, pressure safety and the rig (its T2 needs it), with a fit test expiring within 30 days; the
// instructor and the safety officer are current in composite handling, the fit test and the rig.
const DEMO_SESSIONS: DemoSession[] = [
  { course: 'composite_ppe', day: daysAgo(100), instructor: INSTRUCTOR, place: 'Workshop, laminating bay', capacity: 8, trained: [MEMBER, SAFETY] },
  { course: 'composite_ppe', day: daysAgo(95), instructor: SAFETY, place: 'Workshop, laminating bay', capacity: 8, trained: [INSTRUCTOR] },
  { course: 'pressure_safety', day: daysAgo(50), instructor: INSTRUCTOR, place: 'Launch field, fill station', capacity: 10, trained: [MEMBER] },
  // Twelve months back and 20 days on: it expires 20 days from the seed date.
  { course: 'respirator_fit', day: today => addCalendarDays(addCalendarMonths(today, -12), 20), instructor: SAFETY, place: 'Workshop, sanding booth', capacity: 4, trained: [MEMBER] },
  { course: 'respirator_fit', day: daysAgo(60), instructor: ODILE, place: 'Workshop, sanding booth', capacity: 4, trained: [INSTRUCTOR, SAFETY] },
  { course: 'rig_operator', day: daysAgo(120), instructor: ODILE, place: 'Test bay, hydrostatic rig', capacity: 6, trained: [MEMBER, INSTRUCTOR, SAFETY] },
  // Upcoming and full, with two members waiting.
  { course: 'composite_ppe', day: today => addCalendarDays(today, 10), instructor: INSTRUCTOR, place: 'Workshop, laminating bay', capacity: 4,
    enrolled: [VESNA, WREN, XANTHE, YESTIN], waiting: [ZILLAH, AUBREY] },
]

/** 10:00–13:00 on `day` on the club's wall clock, as instants. */
function sessionTimes(day: string): { startsAt: Date, endsAt: Date } {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number]
  return {
    startsAt: new Date(new TZDate(y, m - 1, d, 10, 0, DEMO_TIME_ZONE).getTime()),
    endsAt: new Date(new TZDate(y, m - 1, d, 13, 0, DEMO_TIME_ZONE).getTime()),
  }
}

/**
 * Training sessions with their enrolments and issued records for the demo accounts, and one upcoming
 * composite handling session that is full with a waiting list. A session is found by course and
 * start, so a second run adds nothing.
 */
export async function seedTraining(ctx: SeedContext): Promise<void> {
  const { transaction, clubId, sequelize } = ctx
  if (!clubId) throw new Error('seedClub must run before seedTraining')
  const membership = (email: string) => {
    const id = ctx.memberIds.get(email)
    if (!id) throw new Error(`seedMembers must run before seedTraining (${email})`)
    return id
  }
  const q = <T extends object>(sql: string, replacements: Record<string, unknown>) =>
    sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT, transaction })
  for (const s of DEMO_SESSIONS) {
    const day = s.day(ctx.today)
    const { startsAt, endsAt } = sessionTimes(day)
    const [course] = await q<{ id: string, name: string, validity_months: number, pass_mark_percent: number | null, practical_required: boolean }>(
      'SELECT id, name, validity_months, pass_mark_percent, practical_required FROM courses WHERE club_id = :clubId AND code = :code', { clubId, code: s.course })
    if (!course) throw new Error(`no course ${s.course} in the demo club`)
    const [found] = await q<{ id: string }>('SELECT id FROM training_sessions WHERE club_id = :clubId AND course_id = :courseId AND starts_at = :startsAt',
      { clubId, courseId: course.id, startsAt })
    if (found) continue
    const instructorId = membership(s.instructor)
    const past = !!s.trained
    const [session] = await q<{ id: string }>(
      `INSERT INTO training_sessions (club_id, course_id, instructor_membership_id, starts_at, ends_at, place, capacity, issued_at, issued_by_membership_id)
       VALUES (:clubId, :courseId, :instructorId, :startsAt, :endsAt, :place, :capacity, :issuedAt, :issuedBy) RETURNING id`,
      { clubId, courseId: course.id, instructorId, startsAt, endsAt, place: s.place, capacity: s.capacity, issuedAt: past ? endsAt : null, issuedBy: past ? instructorId : null })
    const [trainer] = await q<{ name: string }>('SELECT u.name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = :id', { id: instructorId })
    for (const email of s.trained ?? []) {
      const traineeId = membership(email)
      const [trainee] = await q<{ name: string }>('SELECT u.name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = :id', { id: traineeId })
      const score = course.pass_mark_percent === null ? null : 88
      const practical = course.practical_required ? true : null
      const [record] = await q<{ id: string }>(
        `INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to, trainer_name,
           trainer_membership_id, issued_by_membership_id, result, theory_score_percent, practical_signed_off, expires_on)
         VALUES (:clubId, :traineeId, :courseId, :traineeName, :subject, :day, :day, :trainerName, :instructorId, :instructorId, 'pass', :score, :practical, :expiresOn)
         RETURNING id`,
        { clubId, traineeId, courseId: course.id, traineeName: trainee!.name, subject: course.name, day, trainerName: trainer!.name, instructorId, score, practical, expiresOn: trainingExpiresOn(day, course.validity_months) })
      await q(`INSERT INTO training_enrolments (club_id, session_id, membership_id, status, enrolled_at, attended, theory_score_percent,
                 practical_signed_off, signed_off_by_membership_id, record_id)
               VALUES (:clubId, :sessionId, :traineeId, 'enrolled', :enrolledAt, true, :score, :practical, :signedBy, :recordId) RETURNING id`,
      { clubId, sessionId: session!.id, traineeId, enrolledAt: new Date(startsAt.getTime() - 7 * 86_400_000), score, practical, signedBy: practical ? instructorId : null, recordId: record!.id })
    }
    for (const [status, emails] of [['enrolled', s.enrolled ?? []], ['waiting', s.waiting ?? []]] as const) {
      for (const email of emails) {
        await q(`INSERT INTO training_enrolments (club_id, session_id, membership_id, status) VALUES (:clubId, :sessionId, :id, :status) RETURNING id`,
          { clubId, sessionId: session!.id, id: membership(email), status })
      }
    }
  }
}
