import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { clubToday } from '../clubs'
import type { CourseEdit, RetrainingReason } from '#shared/schemas/training'
import type { CourseDto, MyCourseDto, RosterRowDto } from '#shared/types/training'
import type { Paged } from '#shared/types/common'
import { courseStanding } from '#shared/utils/training-validity'

interface CourseRow {
  id: string
  code: string
  name: string
  description: string
  validity_months: number
  pass_mark_percent: number | null
  practical_required: boolean
}

const COURSE_COLUMNS = 'c.id, c.code, c.name, c.description, c.validity_months, c.pass_mark_percent, c.practical_required'

function toCourseDto(r: CourseRow): CourseDto {
  return {
    id: r.id, code: r.code, name: r.name, description: r.description, validityMonths: r.validity_months,
    passMarkPercent: r.pass_mark_percent, practicalRequired: r.practical_required,
  }
}

/**
 * Every course of the actor's club with where the actor stands in it on the club's today, by the one
 * rule (courseStanding) over their latest passing record of each (the same record courseNeeds reads).
 */
export async function myCourses(actor: Actor, now = new Date()): Promise<MyCourseDto[]> {
  const today = clubToday(actor.club, now)
  const rows = await useDb().query<CourseRow & { record_id: string | null, trained_to: string | null, expires_on: string | null, taken_elsewhere: boolean | null, retraining_reason: string | null, retraining: boolean | null }>(
    `SELECT ${COURSE_COLUMNS}, r.id AS record_id, r.trained_to::text AS trained_to, r.expires_on::text AS expires_on,
            r.taken_elsewhere, r.retraining_reason, r.retraining_required_at IS NOT NULL AS retraining
       FROM courses c
       LEFT JOIN LATERAL (
         SELECT id, trained_to, expires_on, taken_elsewhere, retraining_reason, retraining_required_at FROM training_records
          WHERE membership_id = :membershipId AND course_id = c.id AND result = 'pass' AND confirmed_at IS NOT NULL
          ORDER BY trained_to DESC, created_at DESC LIMIT 1
       ) r ON true
      WHERE c.club_id = :clubId ORDER BY c.name`,
    { replacements: { clubId: actor.club.id, membershipId: actor.membership.id }, type: QueryTypes.SELECT })
  return rows.map((r) => {
    const latest = r.record_id
      ? { recordId: r.record_id, trainedOn: r.trained_to!, expiresOn: r.expires_on!, takenElsewhere: !!r.taken_elsewhere, retrainingReason: r.retraining_reason as RetrainingReason | null }
      : null
    const standing = courseStanding(latest ? { expiresOn: latest.expiresOn, retrainingRequired: !!r.retraining } : null, today)
    return { ...toCourseDto(r), standing, latest }
  })
}

/** Course `id` of club `clubId`, or null. */
export async function findCourse(clubId: string, id: string): Promise<CourseDto | null> {
  const [row] = await useDb().query<CourseRow>(`SELECT ${COURSE_COLUMNS} FROM courses c WHERE c.id = :id AND c.club_id = :clubId`,
    { replacements: { id, clubId }, type: QueryTypes.SELECT })
  return row ? toCourseDto(row) : null
}

/**
 * Saves course `id` of the actor's club (policy.edit): name, description, validity, pass mark and
 * practical sign-off, audited with the values before and after. Its code stays, so the rules that
 * name it keep working. A name another course has answers 409. Records already issued keep their
 * expiry; the new validity applies to records issued from now on.
 */
export async function updateCourse(actor: Actor, id: string, input: CourseEdit): Promise<CourseDto> {
  return inTransaction(async (transaction) => {
    const [before] = await useDb().query<CourseRow>(`SELECT ${COURSE_COLUMNS} FROM courses c WHERE c.id = :id AND c.club_id = :clubId FOR UPDATE`,
      { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
    if (!before) notFound('No such course')
    const [after] = await useDb().query<CourseRow>(
      `UPDATE courses c SET name = :name, description = :description, validity_months = :validityMonths,
              pass_mark_percent = :passMarkPercent, practical_required = :practicalRequired, updated_at = now()
        WHERE c.id = :id AND c.club_id = :clubId RETURNING ${COURSE_COLUMNS}`,
      { replacements: { ...input, id, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
    const was = toCourseDto(before)
    const now = toCourseDto(after!)
    const fields = (['name', 'description', 'validityMonths', 'passMarkPercent', 'practicalRequired'] as const).filter(f => was[f] !== now[f])
    await recordAudit(actor, actor.club.id, {
      action: 'training.course', subjectType: 'course', subjectId: id,
      before: Object.fromEntries(fields.map(f => [f, was[f]])), after: Object.fromEntries(fields.map(f => [f, now[f]])),
    }, transaction)
    return now
  }, { uniqueMessage: 'Another course already has that name.' })
}

/**
 * The roster of course `courseId`: members of the club (not resigned) who are current in it on the
 * club's today, a page at a time, by name. "Current" here mirrors isCurrentStanding in SQL (latest
 * passing record, not flagged, expiring today or later) so the paging happens in the database; each
 * row's standing (current or expiring) then comes from courseStanding itself. Null: no such course.
 */
export async function courseRoster(clubId: string, timeZone: string, courseId: string, page: number, pageSize: number, now = new Date()): Promise<Paged<RosterRowDto> | null> {
  if (!(await findCourse(clubId, courseId))) return null
  const today = clubToday({ timeZone }, now)
  const rows = await useDb().query<{ membership_id: string, name: string, trained_to: string, expires_on: string, total: string }>(
    `WITH latest AS (
       SELECT DISTINCT ON (r.membership_id) r.membership_id, r.trained_to, r.expires_on, r.retraining_required_at
         FROM training_records r
        WHERE r.club_id = :clubId AND r.course_id = :courseId AND r.result = 'pass' AND r.confirmed_at IS NOT NULL
        ORDER BY r.membership_id, r.trained_to DESC, r.created_at DESC)
     SELECT l.membership_id, u.name, l.trained_to::text AS trained_to, l.expires_on::text AS expires_on, count(*) OVER () AS total
       FROM latest l JOIN memberships m ON m.id = l.membership_id JOIN users u ON u.id = m.user_id
      WHERE l.retraining_required_at IS NULL AND l.expires_on >= :today AND m.resigned_at IS NULL
      ORDER BY u.name, l.membership_id LIMIT :limit OFFSET :offset`,
    { replacements: { clubId, courseId, today, limit: pageSize, offset: (page - 1) * pageSize }, type: QueryTypes.SELECT })
  return {
    items: rows.map(r => ({
      membershipId: r.membership_id, name: r.name, trainedOn: r.trained_to, expiresOn: r.expires_on,
      standing: courseStanding({ expiresOn: r.expires_on, retrainingRequired: false }, today),
    })),
    page, pageSize, total: rows.length ? Number(rows[0]!.total) : 0,
  }
}
