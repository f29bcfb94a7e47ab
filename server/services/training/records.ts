import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import type { ElsewhereRecord, EvidenceContentType, RetrainingFlag, RetrainingReason } from '#shared/schemas/training'
import type { EvidenceDto, TrainingRecordDto } from '#shared/types/training'
import { trainingExpiresOn } from '#shared/utils/training-validity'
import { addCalendarDays } from '#shared/utils/dates'

interface RecordRow {
  id: string
  membership_id: string
  trainee_name: string
  course_id: string
  course_code: string
  subject: string
  trained_from: string
  trained_to: string
  trainer_name: string
  result: 'pass' | 'fail'
  theory_score_percent: number | null
  practical_signed_off: boolean | null
  expires_on: string
  taken_elsewhere: boolean
  retraining_required_at: Date | null
  retraining_reason: RetrainingReason | null
  retraining_note: string | null
}

/** An evidence row as the routes return it. */
export function toEvidenceDto(e: { id: string, membership_id: string, record_id: string | null, content_type: EvidenceContentType, byte_size: number, created_at: Date }): EvidenceDto {
  return {
    id: e.id, membershipId: e.membership_id, recordId: e.record_id, contentType: e.content_type, byteSize: e.byte_size,
    createdAt: new Date(e.created_at).toISOString(), url: `/api/training/evidence/${e.id}`,
  }
}

/**
 * The training records of member `membershipId` of club `clubId`, newest first, each with its evidence
 * files. Who may ask is the route's business (the member, or an officer).
 */
export async function memberRecords(clubId: string, membershipId: string): Promise<TrainingRecordDto[]> {
  const rows = await useDb().query<RecordRow>(
    `SELECT r.id, r.membership_id, r.trainee_name, r.course_id, c.code AS course_code, r.subject, r.trained_from::text AS trained_from,
            r.trained_to::text AS trained_to, r.trainer_name, r.result, r.theory_score_percent, r.practical_signed_off,
            r.expires_on::text AS expires_on, r.taken_elsewhere, r.retraining_required_at, r.retraining_reason, r.retraining_note
       FROM training_records r JOIN courses c ON c.id = r.course_id
      WHERE r.club_id = :clubId AND r.membership_id = :membershipId
      ORDER BY r.trained_to DESC, r.created_at DESC LIMIT 500`,
    { replacements: { clubId, membershipId }, type: QueryTypes.SELECT })
  const evidence = rows.length
    ? await useDb().query<Parameters<typeof toEvidenceDto>[0]>(
        'SELECT id, membership_id, record_id, content_type, byte_size, created_at FROM training_evidence WHERE record_id IN (:ids) ORDER BY created_at',
        { replacements: { ids: rows.map(r => r.id) }, type: QueryTypes.SELECT })
    : []
  return rows.map(r => ({
    id: r.id, membershipId: r.membership_id, traineeName: r.trainee_name, courseId: r.course_id, courseCode: r.course_code,
    subject: r.subject, trainedFrom: r.trained_from, trainedTo: r.trained_to, trainerName: r.trainer_name, result: r.result,
    theoryScorePercent: r.theory_score_percent, practicalSignedOff: r.practical_signed_off, expiresOn: r.expires_on,
    takenElsewhere: r.taken_elsewhere,
    retraining: r.retraining_required_at ? { reason: r.retraining_reason!, note: r.retraining_note, flaggedAt: new Date(r.retraining_required_at).toISOString() } : null,
    evidence: evidence.filter(e => e.record_id === r.id).map(toEvidenceDto),
  }))
}

/** Whether member `membershipId` belongs to club `clubId`. */
export async function isClubMember(clubId: string, membershipId: string): Promise<boolean> {
  const [row] = await useDb().query('SELECT 1 FROM memberships WHERE id = :membershipId AND club_id = :clubId',
    { replacements: { clubId, membershipId }, type: QueryTypes.SELECT })
  return !!row
}

/**
 * An instructor (training.run) enters a course the member took elsewhere, marked as such: the
 * trainer's name (and where) as given, a pass, the expiry by the one rule from the last day, and the
 * evidence files already uploaded for that member (at least one, none attached to another record).
 * Nobody enters their own. Audited. Returns the member's record.
 */
export async function addRecordTakenElsewhere(actor: Actor, input: ElsewhereRecord, today: string): Promise<TrainingRecordDto> {
  if (input.membershipId === actor.membership.id) refuse({ code: 'OWN_RECORD', message: 'Nobody enters their own training record; another instructor does.' })
  if (input.trainedTo > today) refuse({ code: 'NOT_YET_TRAINED', message: 'A record is entered once the course has been taken: its last day is today or earlier.' })
  const id = await inTransaction(async (transaction) => {
    const [who] = await useDb().query<{ name: string, course_name: string, validity_months: number }>(
      `SELECT u.name, c.name AS course_name, c.validity_months FROM memberships m JOIN users u ON u.id = m.user_id
         JOIN courses c ON c.club_id = m.club_id AND c.id = :courseId
        WHERE m.id = :membershipId AND m.club_id = :clubId`,
      { replacements: { membershipId: input.membershipId, courseId: input.courseId, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
    if (!who) notFound('No such member or course')
    const evidence = await useDb().query<{ id: string }>(
      `SELECT id FROM training_evidence WHERE id IN (:ids) AND club_id = :clubId AND membership_id = :membershipId AND record_id IS NULL FOR UPDATE`,
      { replacements: { ids: input.evidenceIds, clubId: actor.club.id, membershipId: input.membershipId }, type: QueryTypes.SELECT, transaction })
    if (evidence.length !== new Set(input.evidenceIds).size) {
      refuse({ code: 'EVIDENCE_MISSING', message: 'Attach evidence uploaded for this member and not yet part of another record.' })
    }
    const [record] = await useDb().query<{ id: string }>(
      `INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to, trainer_name,
         trainer_membership_id, issued_by_membership_id, result, theory_score_percent, practical_signed_off, expires_on, taken_elsewhere)
       VALUES (:clubId, :membershipId, :courseId, :traineeName, :subject, :trainedFrom, :trainedTo, :trainerName,
         NULL, :issuerId, 'pass', :score, NULL, :expiresOn, true) RETURNING id`,
      {
        replacements: {
          clubId: actor.club.id, membershipId: input.membershipId, courseId: input.courseId, traineeName: who.name, subject: who.course_name,
          trainedFrom: input.trainedFrom, trainedTo: input.trainedTo, trainerName: input.trainerName, issuerId: actor.membership.id,
          score: input.theoryScorePercent ?? null, expiresOn: trainingExpiresOn(input.trainedTo, who.validity_months),
        },
        type: QueryTypes.SELECT, transaction,
      })
    await useDb().query('UPDATE training_evidence SET record_id = :recordId WHERE id IN (:ids)', { replacements: { recordId: record!.id, ids: input.evidenceIds }, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'training.record_elsewhere', subjectType: 'training_record', subjectId: record!.id,
      after: { courseId: input.courseId, trainedTo: input.trainedTo, evidenceFiles: evidence.length },
    }, transaction)
    return record!.id
  })
  return (await memberRecords(actor.club.id, input.membershipId)).find(r => r.id === id)!
}

/**
 * Flags record `id` "retraining required" (training.flag) with a reason and an optional note: from
 * now on it is not current, until a new record of the course is issued. A record already flagged
 * answers 409. Audited.
 */
export async function flagRetraining(actor: Actor, id: string, input: RetrainingFlag): Promise<TrainingRecordDto> {
  const membershipId = await inTransaction(async (transaction) => {
    const [row] = await useDb().query<{ membership_id: string, retraining_reason: string | null }>(
      'SELECT membership_id, retraining_reason FROM training_records WHERE id = :id AND club_id = :clubId FOR UPDATE',
      { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
    if (!row) notFound('No such training record')
    if (row.retraining_reason) conflict('This record is already flagged for retraining.')
    await useDb().query(
      `UPDATE training_records SET retraining_required_at = now(), retraining_reason = :reason, retraining_note = :note,
              retraining_flagged_by_membership_id = :me WHERE id = :id`,
      { replacements: { reason: input.reason, note: input.note ?? null, me: actor.membership.id, id }, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'training.retraining', subjectType: 'training_record', subjectId: id,
      before: { retrainingReason: null }, after: { retrainingReason: input.reason }, reason: input.note ?? null,
    }, transaction)
    return row.membership_id
  })
  return (await memberRecords(actor.club.id, membershipId)).find(r => r.id === id)!
}

/** The warnings before a record's expiry, in days: 60, 30 and 7 (safety e-mails, no opt-out). */
export const TRAINING_EXPIRY_NOTICE_DAYS = [60, 30, 7] as const

/** A current record that expires within the first warning window, with the warning now due. */
export interface ExpiringRecord {
  recordId: string
  membershipId: string
  email: string
  name: string
  courseCode: string
  courseName: string
  expiresOn: string
  /** The tightest warning (60, 30 or 7 days) reached on `today`. */
  daysBefore: number
}

/**
 * Each member's latest passing record of each course of club `clubId` (not flagged, not resigned or
 * suspended) that expires between `today` and 60 days on, with the tightest warning reached today: a
 * record first seen 5 days out gets the 7-day warning only, never all three at once.
 */
export async function trainingRecordsExpiringSoon(clubId: string, today: string): Promise<ExpiringRecord[]> {
  const rows = await useDb().query<{ id: string, membership_id: string, email: string, name: string, code: string, course_name: string, expires_on: string }>(
    `SELECT l.id, l.membership_id, u.email, u.name, c.code, c.name AS course_name, l.expires_on::text AS expires_on
       FROM (SELECT DISTINCT ON (r.membership_id, r.course_id) r.id, r.membership_id, r.course_id, r.expires_on, r.retraining_required_at
               FROM training_records r WHERE r.club_id = :clubId AND r.result = 'pass' AND r.confirmed_at IS NOT NULL
              ORDER BY r.membership_id, r.course_id, r.trained_to DESC, r.created_at DESC) l
       JOIN courses c ON c.id = l.course_id JOIN memberships m ON m.id = l.membership_id JOIN users u ON u.id = m.user_id
      WHERE l.retraining_required_at IS NULL AND l.expires_on BETWEEN :today AND :until
        AND m.resigned_at IS NULL AND m.suspended_at IS NULL
      ORDER BY l.expires_on, l.id`,
    { replacements: { clubId, today, until: addCalendarDays(today, TRAINING_EXPIRY_NOTICE_DAYS[0]) }, type: QueryTypes.SELECT })
  return rows.map((r) => {
    const daysBefore = [...TRAINING_EXPIRY_NOTICE_DAYS].reverse().find(d => addCalendarDays(r.expires_on, -d) <= today)!
    return { recordId: r.id, membershipId: r.membership_id, email: r.email, name: r.name, courseCode: r.code, courseName: r.course_name, expiresOn: r.expires_on, daysBefore }
  })
}
