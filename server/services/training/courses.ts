import { QueryTypes, type Transaction } from 'sequelize'
import { courseStanding, isCurrentStanding, type CourseStanding } from '#shared/utils/training-validity'

/**
 * The codes of the courses every club starts with (migration 0017 adds them to each new club); rules
 * name courses by these codes, so a club may rename or re-time a course without breaking them.
 */
export const STARTING_COURSE_CODES = ['safety_briefing', 'composite_ppe', 'respirator_fit', 'pressure_safety', 'rig_operator', 'range_safety', 'first_aid'] as const
export type StartingCourseCode = typeof STARTING_COURSE_CODES[number]

/** A course a rule needs, with where the member stands in it. */
export interface CourseNeed {
  code: string
  name: string
  standing: CourseStanding
}

/**
 * Where member `membershipId` of club `clubId` stands in each course named by `codes`, on the club's
 * `today` (YYYY-MM-DD), by the one validity rule (`courseStanding`): their latest passing record of
 * each decides (a newer record replaces a flagged one). One query. Codes the club has no course for
 * come back as never taken, named by their code.
 */
export async function courseNeeds(clubId: string, membershipId: string, codes: readonly string[], today: string, transaction?: Transaction): Promise<CourseNeed[]> {
  if (!codes.length) return []
  const rows = await useDb().query<{ code: string, name: string, expires_on: string | null, retraining: boolean | null }>(
    `SELECT c.code, c.name, r.expires_on::text AS expires_on, r.retraining_required_at IS NOT NULL AS retraining
       FROM courses c
       LEFT JOIN LATERAL (
         SELECT expires_on, retraining_required_at FROM training_records
          WHERE membership_id = :membershipId AND course_id = c.id AND result = 'pass' AND confirmed_at IS NOT NULL
          ORDER BY trained_to DESC, created_at DESC LIMIT 1
       ) r ON true
      WHERE c.club_id = :clubId AND c.code IN (:codes)`,
    { replacements: { clubId, membershipId, codes: [...codes] }, type: QueryTypes.SELECT, transaction })
  const found = new Map(rows.map(r => [r.code, r]))
  return codes.map((code) => {
    const r = found.get(code)
    if (!r) return { code, name: code, standing: 'never_taken' as const }
    const latest = r.expires_on ? { expiresOn: r.expires_on, retrainingRequired: !!r.retraining } : null
    return { code, name: r.name, standing: courseStanding(latest, today) }
  })
}

/** The courses among `codes` member `membershipId` is NOT current in on `today` (empty: all current). */
export async function coursesNotCurrent(clubId: string, membershipId: string, codes: readonly string[], today: string, transaction?: Transaction): Promise<CourseNeed[]> {
  return (await courseNeeds(clubId, membershipId, codes, today, transaction)).filter(n => !isCurrentStanding(n.standing))
}
