import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import type { Attendance } from '#shared/schemas/training'
import type { IssueResultDto } from '#shared/types/training'
import { trainingExpiresOn } from '#shared/utils/training-validity'
import { dateInZone } from '#shared/utils/dates'

const OWN_RECORD = { code: 'OWN_RECORD', message: 'Nobody assesses, signs off or issues their own training record; another instructor does.' }

/**
 * An instructor (training.run) records attendance, the theory score and the practical sign-off of
 * trainees enrolled in session `id`, under the session's lock, until its records are issued. The
 * sign-off is kept with who gave it; nobody assesses themselves (422, and the table checks it).
 */
export async function recordAttendance(actor: Actor, id: string, input: Attendance): Promise<void> {
  await inTransaction(async (transaction) => {
    const session = await lockTrainingSession(actor.club.id, id, transaction)
    if (!session) notFound('No such session')
    if (session.issued_at) refuse({ code: 'ALREADY_ISSUED', message: 'This session\'s records are issued; its assessment can no longer change.' })
    const rows = await useDb().query<{ id: string, membership_id: string, status: string }>(
      'SELECT id, membership_id, status FROM training_enrolments WHERE session_id = :id AND id IN (:ids)',
      { replacements: { id, ids: input.entries.map(e => e.enrolmentId) }, type: QueryTypes.SELECT, transaction })
    const byId = new Map(rows.map(r => [r.id, r]))
    for (const entry of input.entries) {
      const row = byId.get(entry.enrolmentId)
      if (!row || row.status !== 'enrolled') refuse({ code: 'NOT_ENROLLED', message: 'Only trainees holding a place in this session are assessed.' })
      if (row.membership_id === actor.membership.id) refuse(OWN_RECORD)
    }
    for (const entry of input.entries) {
      const signed = entry.attended && entry.practicalSignedOff
      await useDb().query(
        `UPDATE training_enrolments SET attended = :attended, theory_score_percent = :score, practical_signed_off = :signed,
                signed_off_by_membership_id = :by
          WHERE id = :enrolmentId`,
        { replacements: { attended: entry.attended, score: entry.attended ? entry.theoryScorePercent : null, signed, by: signed ? actor.membership.id : null, enrolmentId: entry.enrolmentId }, transaction })
    }
  })
}

/**
 * Issues the records of session `id` in one step and one transaction: one record per trainee marked
 * present, a pass when the theory score reaches the course's pass mark (if it has one) and the
 * practical is signed off (if it needs one), a fail otherwise, each with the trainee's name, the
 * dates, the subject, the trainer, the result and the expiry (the one rule, trainingExpiresOn from the
 * last day). Refused (422) before the session starts, once issued, with nobody present, with a theory
 * score missing, or when the issuer is among the trainees. Audited.
 */
export async function issueSessionRecords(actor: Actor, id: string, now = new Date()): Promise<IssueResultDto> {
  return inTransaction(async (transaction) => {
    const session = await lockTrainingSession(actor.club.id, id, transaction)
    if (!session) notFound('No such session')
    if (session.issued_at) refuse({ code: 'ALREADY_ISSUED', message: 'This session\'s records are already issued.' })
    if (new Date(session.starts_at) > now) refuse({ code: 'NOT_HELD_YET', message: 'Records are issued once the session has been held.' })
    const [course] = await useDb().query<{ name: string, validity_months: number, pass_mark_percent: number | null, practical_required: boolean, trainer: string }>(
      `SELECT c.name, c.validity_months, c.pass_mark_percent, c.practical_required, u.name AS trainer
         FROM courses c, memberships m JOIN users u ON u.id = m.user_id WHERE c.id = :courseId AND m.id = :instructor`,
      { replacements: { courseId: session.course_id, instructor: session.instructor_membership_id }, type: QueryTypes.SELECT, transaction })
    const trainees = await useDb().query<{ id: string, membership_id: string, name: string, theory_score_percent: number | null, practical_signed_off: boolean | null }>(
      `SELECT e.id, e.membership_id, u.name, e.theory_score_percent, e.practical_signed_off
         FROM training_enrolments e JOIN memberships m ON m.id = e.membership_id JOIN users u ON u.id = m.user_id
        WHERE e.session_id = :id AND e.status = 'enrolled' AND e.attended ORDER BY e.arrival`,
      { replacements: { id }, type: QueryTypes.SELECT, transaction })
    if (!trainees.length) refuse({ code: 'NOBODY_ATTENDED', message: 'Mark who attended before issuing the records.' })
    if (trainees.some(t => t.membership_id === actor.membership.id)) refuse(OWN_RECORD)
    const c = course!
    if (c.pass_mark_percent !== null && trainees.some(t => t.theory_score_percent === null)) {
      refuse({ code: 'SCORE_MISSING', message: `Enter the theory score of everyone present: ${trainees.filter(t => t.theory_score_percent === null).map(t => t.name).join(', ')}.` })
    }
    const trainedFrom = dateInZone(new Date(session.starts_at), actor.club.timeZone)
    const trainedTo = dateInZone(new Date(session.ends_at), actor.club.timeZone)
    const expiresOn = trainingExpiresOn(trainedTo, c.validity_months)
    let passed = 0
    for (const t of trainees) {
      const theoryOk = c.pass_mark_percent === null || (t.theory_score_percent ?? -1) >= c.pass_mark_percent
      const practicalOk = !c.practical_required || t.practical_signed_off === true
      const result = theoryOk && practicalOk ? 'pass' : 'fail'
      if (result === 'pass') passed += 1
      const [record] = await useDb().query<{ id: string }>(
        `INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to, trainer_name,
           trainer_membership_id, issued_by_membership_id, result, theory_score_percent, practical_signed_off, expires_on)
         VALUES (:clubId, :membershipId, :courseId, :traineeName, :subject, :trainedFrom, :trainedTo, :trainerName,
           :trainerId, :issuerId, :result, :score, :practical, :expiresOn) RETURNING id`,
        {
          replacements: {
            clubId: actor.club.id, membershipId: t.membership_id, courseId: session.course_id, traineeName: t.name, subject: c.name,
            trainedFrom, trainedTo, trainerName: c.trainer, trainerId: session.instructor_membership_id, issuerId: actor.membership.id,
            result, score: t.theory_score_percent, practical: c.practical_required ? t.practical_signed_off === true : null, expiresOn,
          },
          type: QueryTypes.SELECT, transaction,
        })
      await useDb().query('UPDATE training_enrolments SET record_id = :recordId WHERE id = :id', { replacements: { recordId: record!.id, id: t.id }, transaction })
    }
    await useDb().query('UPDATE training_sessions SET issued_at = now(), issued_by_membership_id = :me WHERE id = :id',
      { replacements: { me: actor.membership.id, id }, transaction })
    const outcome = { issued: trainees.length, passed, failed: trainees.length - passed }
    await recordAudit(actor, actor.club.id, { action: 'training.issue', subjectType: 'training_session', subjectId: id, after: { ...outcome, expiresOn } }, transaction)
    return outcome
  })
}
