import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { normaliseRoles } from '#shared/utils/permissions'
import type { ImportRow } from '#shared/schemas/club-data'
import { recordAudit } from '../audit'
import { CONTACT_COLUMNS, changesAnything, changesFor, importedExpiry, type ClubLookups, type MemberNow } from './lookups'

export type AppliedOutcome = 'created' | 'updated' | 'unchanged'

/**
 * Writes one checked roster row inside the run's transaction: a new account (no password: nobody can
 * sign in with it until its member sets one from the welcome link; nothing is e-mailed) and an
 * approved membership, or the changes to the member its e-mail names (`changesFor`: roles only
 * added, paid-through only moved later). A past training record or tier arrives unconfirmed
 * (imported, `confirmed_at` NULL) — no rule counts it until an officer confirms it. One audit event
 * per member whose roles or paid-through it sets. `member` is the account as read by the batch (or
 * undefined); the importing admin's own membership is refused before this is called.
 */
export async function applyImportRow(actor: Actor, row: ImportRow, member: MemberNow | undefined, lookups: ClubLookups, transaction: Transaction): Promise<{ outcome: AppliedOutcome, member: MemberNow }> {
  const db = useDb()
  const clubId = actor.club.id
  if (!member?.membership_id) {
    const userId = member?.user_id ?? (await db.query<{ id: string }>(
      'INSERT INTO users (email, name, password_hash) VALUES (:email, :name, NULL) RETURNING id',
      { replacements: { email: row.email, name: row.name }, type: QueryTypes.SELECT, transaction }))[0]!.id
    const roles = normaliseRoles(row.roles ?? [])
    const planId = row.plan ? lookups.plans.get(row.plan.toLowerCase()) ?? null : null
    const [m] = await db.query<{ id: string }>(`
      INSERT INTO memberships (club_id, user_id, roles, approved_at, paid_through, dues_plan_id, phone, birth_date,
        emergency_contact_name, emergency_contact_phone, guardian_name, guardian_email)
      VALUES (:clubId, :userId, ARRAY[:roles]::text[], now(), :paidThrough, :planId, :phone, :birthDate,
        :ecName, :ecPhone, :guardianName, :guardianEmail) RETURNING id`,
    {
      replacements: {
        clubId, userId, roles, paidThrough: row.paidThrough ?? null, planId, phone: row.phone ?? null, birthDate: row.birthDate ?? null,
        ecName: row.emergencyContactName ?? null, ecPhone: row.emergencyContactPhone ?? null,
        guardianName: row.guardianName ?? null, guardianEmail: row.guardianEmail ?? null,
      },
      type: QueryTypes.SELECT, transaction,
    })
    const created: MemberNow = {
      membership_id: m!.id, user_id: userId, email: row.email, name: member?.name ?? row.name, roles, paid_through: row.paidThrough ?? null,
      dues_plan_id: planId, phone: row.phone ?? null, birth_date: row.birthDate ?? null, emergency_contact_name: row.emergencyContactName ?? null,
      emergency_contact_phone: row.emergencyContactPhone ?? null, guardian_name: row.guardianName ?? null, guardian_email: row.guardianEmail ?? null,
      course_dates: [], tier_ranks: [],
    }
    if (roles.length > 1 || row.paidThrough) {
      await recordAudit(actor, clubId, {
        action: 'member.imported', subjectType: 'membership', subjectId: m!.id,
        before: null, after: { roles, paidThrough: row.paidThrough ?? null },
      }, transaction)
    }
    await addRecords(actor, row, created, lookups, transaction)
    return { outcome: 'created', member: created }
  }

  const changes = changesFor(row, member, lookups)
  if (!changesAnything(changes)) return { outcome: 'unchanged', member }
  const sets: string[] = []
  const replacements: Record<string, unknown> = { id: member.membership_id, clubId }
  for (const f of changes.contact) {
    sets.push(`${CONTACT_COLUMNS[f]} = :${f}`)
    replacements[f] = row[f]
  }
  // Roles are only ever added, and paid-through only moved later, in the statement itself.
  if (changes.addRoles.length) {
    sets.push('roles = ARRAY(SELECT r FROM unnest(ARRAY[\'member\', \'instructor\', \'safety_officer\', \'admin\']) AS r WHERE r = ANY (roles) OR r = ANY (ARRAY[:addRoles]::text[]))')
    replacements.addRoles = changes.addRoles
  }
  if (changes.paidThrough) {
    sets.push('paid_through = GREATEST(paid_through, :paidThrough::date)')
    replacements.paidThrough = changes.paidThrough
  }
  if (changes.planId) {
    sets.push('dues_plan_id = :planId')
    replacements.planId = changes.planId
  }
  const next: MemberNow = { ...member, course_dates: [...member.course_dates ?? []], tier_ranks: [...member.tier_ranks ?? []] }
  if (sets.length) {
    const [after] = await db.query<{ roles: string[], paid_through: string | null }>(
      `UPDATE memberships SET ${sets.join(', ')}, updated_at = now() WHERE id = :id AND club_id = :clubId RETURNING roles, paid_through::text`,
      { replacements, type: QueryTypes.SELECT, transaction })
    for (const f of changes.contact) (next as unknown as Record<string, unknown>)[CONTACT_COLUMNS[f]] = row[f]
    next.roles = after!.roles
    next.paid_through = after!.paid_through
    if (changes.planId) next.dues_plan_id = changes.planId
    if (changes.addRoles.length || changes.paidThrough) {
      await recordAudit(actor, clubId, {
        action: 'member.imported', subjectType: 'membership', subjectId: member.membership_id,
        before: { roles: member.roles, paidThrough: member.paid_through },
        after: { roles: after!.roles, paidThrough: after!.paid_through },
      }, transaction)
    }
  }
  await addRecords(actor, row, next, lookups, transaction)
  return { outcome: 'updated', member: next }
}

/** Adds the row's past training record and tier to `member` (unconfirmed), unless it holds them already. */
async function addRecords(actor: Actor, row: ImportRow, member: MemberNow, lookups: ClubLookups, transaction: Transaction): Promise<void> {
  const db = useDb()
  const course = row.training ? lookups.courses.get(row.training.course.toLowerCase()) : undefined
  if (row.training && course && !member.course_dates!.includes(`${course.id}@${row.training.trainedOn}`)) {
    await db.query(`
      INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to, trainer_name,
        trainer_membership_id, issued_by_membership_id, result, expires_on, taken_elsewhere, imported, confirmed_at)
      VALUES (:clubId, :membershipId, :courseId, :name, :subject, :on, :on, :assessor, NULL, :me, 'pass', :expiresOn, true, true, NULL)`,
    {
      replacements: {
        clubId: actor.club.id, membershipId: member.membership_id, courseId: course.id, name: member.name, subject: course.name,
        on: row.training.trainedOn, assessor: row.training.assessorName, me: actor.membership.id,
        expiresOn: importedExpiry('training', row.training.trainedOn, course.validityMonths),
      },
      transaction,
    })
    member.course_dates!.push(`${course.id}@${row.training.trainedOn}`)
  }
  const validity = row.tier ? lookups.tiers.get(row.tier.rank) : undefined
  if (row.tier && validity && !member.tier_ranks!.includes(row.tier.rank)) {
    await db.query(`
      INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on, imported, imported_assessor_name, confirmed_at)
      VALUES (:clubId, :membershipId, :rank, :on, :on, :expiresOn, true, :assessor, NULL)
      ON CONFLICT (membership_id, rank) DO NOTHING`,
    {
      replacements: {
        clubId: actor.club.id, membershipId: member.membership_id, rank: row.tier.rank, on: row.tier.signedOn,
        expiresOn: importedExpiry('tier', row.tier.signedOn, validity), assessor: row.tier.assessorName,
      },
      transaction,
    })
    member.tier_ranks!.push(row.tier.rank)
  }
}
