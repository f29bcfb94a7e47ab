import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockMemberships } from '../../utils/locks'
import { recordAudit } from '../audit'
import type { UnconfirmedRecordDto } from '#shared/types/imported'

// Training records a roster import brought in: unconfirmed (confirmed_at NULL) until an instructor
// vouches for each. Every query that decides eligibility reads `confirmed_at IS NOT NULL` only.

/** The most unconfirmed records one list shows (oldest imports first); confirming makes room. */
const LIST_LIMIT = 500

interface UnconfirmedRow {
  id: string
  membership_id: string
  member_name: string
  course_code: string
  course_name: string
  trained_from: string
  trained_to: string
  trainer_name: string
  result: 'pass' | 'fail'
  expires_on: string
  created_at: Date
}

/** The unconfirmed imported training records of the actor's club, oldest first, by member name. */
export async function unconfirmedRecords(actor: Actor): Promise<UnconfirmedRecordDto[]> {
  const rows = await useDb().query<UnconfirmedRow>(
    `SELECT r.id, r.membership_id, u.name AS member_name, c.code AS course_code, c.name AS course_name,
            r.trained_from::text AS trained_from, r.trained_to::text AS trained_to, r.trainer_name, r.result,
            r.expires_on::text AS expires_on, r.created_at
       FROM training_records r JOIN courses c ON c.id = r.course_id
       JOIN memberships m ON m.id = r.membership_id JOIN users u ON u.id = m.user_id
      WHERE r.club_id = :clubId AND r.confirmed_at IS NULL
      ORDER BY r.created_at, lower(u.name), r.id LIMIT :limit`,
    { replacements: { clubId: actor.club.id, limit: LIST_LIMIT }, type: QueryTypes.SELECT })
  return rows.map(r => ({
    id: r.id, membershipId: r.membership_id, memberName: r.member_name, courseCode: r.course_code, courseName: r.course_name,
    trainedFrom: r.trained_from, trainedTo: r.trained_to, trainerName: r.trainer_name, result: r.result,
    expiresOn: r.expires_on, importedAt: new Date(r.created_at).toISOString(),
  }))
}

/**
 * Record `id` of the actor's club with its member's row locked (step 1 of the lock order), if it is
 * still unconfirmed: 404 when there is no such record, 409 when it was confirmed already, 422 when it
 * is the actor's own (nobody vouches for their own training).
 */
async function lockUnconfirmed(actor: Actor, id: string, transaction: Transaction): Promise<{ membership_id: string, course_id: string, trained_to: string }> {
  const find = () => useDb().query<{ membership_id: string, course_id: string, trained_to: string, confirmed: boolean }>(
    `SELECT membership_id, course_id, trained_to::text AS trained_to, confirmed_at IS NOT NULL AS confirmed
       FROM training_records WHERE id = :id AND club_id = :clubId`,
    { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
  const [seen] = await find()
  if (!seen) notFound('No such training record')
  await lockMemberships([seen.membership_id], transaction, actor.club.id)
  const [row] = await find()
  if (!row) notFound('No such training record')
  if (row.confirmed) conflict('This training record is confirmed already.')
  if (row.membership_id === actor.membership.id) refuse({ code: 'SELF_CONFIRM', message: 'Nobody confirms their own training: another instructor does.' })
  return row
}

/**
 * An instructor (training.run) confirms imported record `id`: from now on it counts for course
 * currency, bookings and tier prerequisites like any other. Audited.
 */
export async function confirmImportedRecord(actor: Actor, id: string): Promise<{ id: string, confirmedAt: string }> {
  return inTransaction(async (transaction) => {
    const row = await lockUnconfirmed(actor, id, transaction)
    const [done] = await useDb().query<{ confirmed_at: Date }>(
      `UPDATE training_records SET confirmed_at = now(), confirmed_by_membership_id = :me
        WHERE id = :id AND confirmed_at IS NULL RETURNING confirmed_at`,
      { replacements: { id, me: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    if (!done) conflict('This training record is confirmed already.')
    await recordAudit(actor, actor.club.id, {
      action: 'training.record_confirm', subjectType: 'training_record', subjectId: id,
      before: { confirmed: false }, after: { confirmed: true, membershipId: row.membership_id, courseId: row.course_id, trainedTo: row.trained_to },
    }, transaction)
    return { id, confirmedAt: new Date(done.confirmed_at).toISOString() }
  })
}

/**
 * An instructor rejects imported record `id` that cannot be vouched for: it is deleted (it never
 * counted), and the audit trail keeps what it said and the reason.
 */
export async function rejectImportedRecord(actor: Actor, id: string, reason: string): Promise<{ id: string, deleted: true }> {
  return inTransaction(async (transaction) => {
    const row = await lockUnconfirmed(actor, id, transaction)
    await useDb().query('DELETE FROM training_records WHERE id = :id AND confirmed_at IS NULL', { replacements: { id }, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'training.record_reject', subjectType: 'training_record', subjectId: id,
      before: { confirmed: false, membershipId: row.membership_id, courseId: row.course_id, trainedTo: row.trained_to }, after: null, reason,
    }, transaction)
    return { id, deleted: true as const }
  })
}
