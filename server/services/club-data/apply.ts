import { QueryTypes, type Transaction } from 'sequelize'
import { AuditEvent } from '../../models'
import type { Actor } from '../../utils/auth'
import { normaliseRoles, ROLES } from '#shared/utils/permissions'
import type { ImportRow } from '#shared/schemas/club-data'
import { CONTACT_COLUMNS, changesAnything, changesFor, importedExpiry, membersByEmail, type ClubLookups, type MemberNow } from './lookups'

export type AppliedOutcome = 'created' | 'updated' | 'unchanged'
export type ImportCounts = Record<AppliedOutcome | 'refused', number>

/** One checked staging row of a batch. */
export interface BatchRow { line: number, row: ImportRow }

type ContactColumn = typeof CONTACT_COLUMNS[keyof typeof CONTACT_COLUMNS]

/** What a batch does to one member (every row of the batch with their e-mail, in file order). */
interface MemberPlan {
  /** The member as read before the batch (undefined: no account; no membership_id: no membership of this club). */
  before: MemberNow | undefined
  /** The member after the rows so far (what the next row of the same e-mail is compared with). */
  now: MemberNow
  create: boolean
  contact: Partial<Record<ContactColumn, string>>
  addRoles: Set<string>
  paidThrough: string | null
  planId: string | null
  training: { courseId: string, subject: string, on: string, assessor: string, expiresOn: string }[]
  tiers: { rank: number, on: string, assessor: string, expiresOn: string }[]
}

/** Adds `row`'s past training record and tier to `plan` unless the member holds them (or an earlier row adds them). */
function planRecords(plan: MemberPlan, row: ImportRow, lookups: ClubLookups): void {
  const course = row.training ? lookups.courses.get(row.training.course.toLowerCase()) : undefined
  if (row.training && course && !plan.now.course_dates!.includes(`${course.id}@${row.training.trainedOn}`)) {
    plan.training.push({
      courseId: course.id, subject: course.name, on: row.training.trainedOn, assessor: row.training.assessorName,
      expiresOn: importedExpiry('training', row.training.trainedOn, course.validityMonths),
    })
    plan.now.course_dates!.push(`${course.id}@${row.training.trainedOn}`)
  }
  const validity = row.tier ? lookups.tiers.get(row.tier.rank) : undefined
  if (row.tier && validity && !plan.now.tier_ranks!.includes(row.tier.rank)) {
    plan.tiers.push({ rank: row.tier.rank, on: row.tier.signedOn, assessor: row.tier.assessorName, expiresOn: importedExpiry('tier', row.tier.signedOn, validity) })
    plan.now.tier_ranks!.push(row.tier.rank)
  }
}

/** A new member of the club from their first row (the account's own name kept when the account exists). */
function newMemberPlan(row: ImportRow, account: MemberNow | undefined, lookups: ClubLookups): MemberPlan {
  const roles = normaliseRoles(row.roles ?? [])
  const planId = row.plan ? lookups.plans.get(row.plan.toLowerCase()) ?? null : null
  const now: MemberNow = {
    membership_id: null, user_id: account?.user_id ?? '', email: row.email, name: account?.name ?? row.name, roles, paid_through: row.paidThrough ?? null,
    dues_plan_id: planId, phone: row.phone ?? null, birth_date: row.birthDate ?? null, emergency_contact_name: row.emergencyContactName ?? null,
    emergency_contact_phone: row.emergencyContactPhone ?? null, guardian_name: row.guardianName ?? null, guardian_email: row.guardianEmail ?? null,
    course_dates: [], tier_ranks: [],
  }
  return { before: account, now, create: true, contact: {}, addRoles: new Set(), paidThrough: null, planId: null, training: [], tiers: [] }
}

/**
 * Folds a later row of a member into `plan` (`changesFor`: contact fields given and different, roles
 * only added, paid-through only moved later, the plan, records not held). Whether it changed anything.
 */
function foldRow(plan: MemberPlan, row: ImportRow, lookups: ClubLookups): boolean {
  const changes = changesFor(row, plan.now, lookups)
  if (!changesAnything(changes)) return false
  const target = plan.create ? plan.now : plan.contact
  for (const f of changes.contact) {
    (plan.now as unknown as Record<string, unknown>)[CONTACT_COLUMNS[f]] = row[f];
    (target as Record<string, unknown>)[CONTACT_COLUMNS[f]] = row[f]
  }
  if (changes.addRoles.length) {
    for (const r of changes.addRoles) plan.addRoles.add(r)
    const held = new Set([...plan.now.roles ?? [], ...changes.addRoles])
    plan.now.roles = ROLES.filter(r => held.has(r))
  }
  if (changes.paidThrough) plan.now.paid_through = plan.paidThrough = changes.paidThrough
  if (changes.planId) plan.now.dues_plan_id = plan.planId = changes.planId
  planRecords(plan, row, lookups)
  return true
}

/** What a batch (or a whole dry run) does to its members so far, by e-mail. */
export type MemberPlans = Map<string, MemberPlan>

/**
 * Folds checked `row` into `plans`: the first row of an e-mail creates the member (no membership of
 * this club yet) or is compared with `member` as read; a later one is compared with the member as the
 * rows before it left them. The outcome of the row; the importing admin's own membership is refused.
 * The dry run and the run both count with it, so the dry run's counts are the run's.
 */
export function planRow(plans: MemberPlans, row: ImportRow, member: MemberNow | undefined, ownMembershipId: string, lookups: ClubLookups): AppliedOutcome | 'refused' {
  const plan = plans.get(row.email)
  if (plan) return foldRow(plan, row, lookups) ? 'updated' : 'unchanged'
  if (member?.membership_id === ownMembershipId) return 'refused'
  if (!member?.membership_id) {
    const created = newMemberPlan(row, member, lookups)
    planRecords(created, row, lookups)
    plans.set(row.email, created)
    return 'created'
  }
  const existing: MemberPlan = {
    before: member, now: { ...member, course_dates: [...member.course_dates ?? []], tier_ranks: [...member.tier_ranks ?? []] },
    create: false, contact: {}, addRoles: new Set(), paidThrough: null, planId: null, training: [], tiers: [],
  }
  plans.set(row.email, existing)
  return foldRow(existing, row, lookups) ? 'updated' : 'unchanged'
}

/**
 * Writes one batch of checked roster rows inside the run's transaction, set-based: the batch's
 * members read in one query, then one statement each for the new accounts, the new memberships, the
 * changed memberships, the training records, the tiers and the audit events — whatever the batch's
 * size. Rows of one e-mail fold into one member in file order, as if written one after another.
 *
 * A new member gets an account with no password (nobody can sign in with it until its member sets one
 * from the welcome link; nothing is e-mailed) and an approved membership; an existing one the changes
 * `changesFor` finds — roles only added and paid-through only moved later, both in the UPDATE itself.
 * A past training record or tier arrives unconfirmed (imported, `confirmed_at` NULL): no rule counts it
 * until an officer confirms it. One audit event per member whose roles or paid-through the batch sets.
 * The importing admin's own membership is never touched: their rows count as refused.
 */
export async function applyImportBatch(actor: Actor, rows: readonly BatchRow[], lookups: ClubLookups, transaction: Transaction): Promise<ImportCounts> {
  const counts: ImportCounts = { created: 0, updated: 0, unchanged: 0, refused: 0 }
  if (!rows.length) return counts
  const clubId = actor.club.id
  const members = await membersByEmail(clubId, [...new Set(rows.map(r => r.row.email))], transaction)
  const plans = new Map<string, MemberPlan>()
  for (const { row } of rows) counts[planRow(plans, row, members.get(row.email), actor.membership.id, lookups)]++
  const all = [...plans.values()]
  const db = useDb()
  const json = (value: unknown) => JSON.stringify(value)
  const audits: { subjectId: string, before: Record<string, unknown> | null, after: Record<string, unknown> }[] = []

  const creating = all.filter(p => p.create)
  const newAccounts = creating.filter(p => !p.before)
  if (newAccounts.length) {
    const made = await db.query<{ id: string, email: string }>(`
      INSERT INTO users (email, name, password_hash)
      SELECT x.email, x.name, NULL FROM jsonb_to_recordset(:rows::jsonb) AS x(email text, name text)
      RETURNING id, lower(email) AS email`,
    { replacements: { rows: json(newAccounts.map(p => ({ email: p.now.email, name: p.now.name }))) }, type: QueryTypes.SELECT, transaction })
    const ids = new Map(made.map(u => [u.email, u.id]))
    for (const p of newAccounts) p.now.user_id = ids.get(p.now.email)!
  }
  if (creating.length) {
    const made = await db.query<{ id: string, user_id: string }>(`
      INSERT INTO memberships (club_id, user_id, roles, approved_at, paid_through, dues_plan_id, phone, birth_date,
        emergency_contact_name, emergency_contact_phone, guardian_name, guardian_email)
      SELECT :clubId, x.user_id, x.roles, now(), x.paid_through, x.dues_plan_id, x.phone, x.birth_date,
        x.emergency_contact_name, x.emergency_contact_phone, x.guardian_name, x.guardian_email
      FROM jsonb_to_recordset(:rows::jsonb) AS x(user_id uuid, roles text[], paid_through date, dues_plan_id uuid, phone text, birth_date date,
        emergency_contact_name text, emergency_contact_phone text, guardian_name text, guardian_email text)
      RETURNING id, user_id`,
    {
      replacements: {
        clubId,
        rows: json(creating.map(({ now: m }) => ({
          user_id: m.user_id, roles: m.roles, paid_through: m.paid_through, dues_plan_id: m.dues_plan_id, phone: m.phone, birth_date: m.birth_date,
          emergency_contact_name: m.emergency_contact_name, emergency_contact_phone: m.emergency_contact_phone,
          guardian_name: m.guardian_name, guardian_email: m.guardian_email,
        }))),
      },
      type: QueryTypes.SELECT, transaction,
    })
    const ids = new Map(made.map(m => [m.user_id, m.id]))
    for (const p of creating) {
      p.now.membership_id = ids.get(p.now.user_id)!
      if ((p.now.roles ?? []).length > 1 || p.now.paid_through) {
        audits.push({ subjectId: p.now.membership_id, before: null, after: { roles: p.now.roles, paidThrough: p.now.paid_through } })
      }
    }
  }

  const changing = all.filter(p => !p.create && (Object.keys(p.contact).length || p.addRoles.size || p.paidThrough || p.planId))
  if (changing.length) {
    // Roles are only ever added, and paid-through only moved later, in the statement itself; a contact
    // field or plan the rows did not give stays as it is (NULL in the batch's record).
    const after = await db.query<{ id: string, roles: string[], paid_through: string | null }>(`
      UPDATE memberships m SET
        phone = COALESCE(x.phone, m.phone), birth_date = COALESCE(x.birth_date, m.birth_date),
        emergency_contact_name = COALESCE(x.emergency_contact_name, m.emergency_contact_name),
        emergency_contact_phone = COALESCE(x.emergency_contact_phone, m.emergency_contact_phone),
        guardian_name = COALESCE(x.guardian_name, m.guardian_name), guardian_email = COALESCE(x.guardian_email, m.guardian_email),
        roles = ARRAY(SELECT r FROM unnest(ARRAY['member', 'instructor', 'safety_officer', 'admin']) AS r WHERE r = ANY (m.roles) OR r = ANY (x.add_roles)),
        paid_through = GREATEST(m.paid_through, x.paid_through),
        dues_plan_id = COALESCE(x.dues_plan_id, m.dues_plan_id),
        updated_at = now()
      FROM jsonb_to_recordset(:rows::jsonb) AS x(id uuid, phone text, birth_date date, emergency_contact_name text, emergency_contact_phone text,
        guardian_name text, guardian_email text, add_roles text[], paid_through date, dues_plan_id uuid)
      WHERE m.id = x.id AND m.club_id = :clubId
      RETURNING m.id, m.roles, m.paid_through::text`,
    {
      replacements: {
        clubId,
        rows: json(changing.map(p => ({
          id: p.now.membership_id, ...p.contact, add_roles: [...p.addRoles], paid_through: p.paidThrough, dues_plan_id: p.planId,
        }))),
      },
      type: QueryTypes.SELECT, transaction,
    })
    const byId = new Map(after.map(a => [a.id, a]))
    for (const p of changing) {
      const a = byId.get(p.now.membership_id!)
      if (!a || !(p.addRoles.size || p.paidThrough)) continue
      audits.push({
        subjectId: a.id,
        before: { roles: p.before!.roles, paidThrough: p.before!.paid_through },
        after: { roles: a.roles, paidThrough: a.paid_through },
      })
    }
  }

  const records = all.flatMap(p => p.training.map(t => ({ membership_id: p.now.membership_id, trainee_name: p.now.name, course_id: t.courseId, subject: t.subject, on: t.on, assessor: t.assessor, expires_on: t.expiresOn })))
  if (records.length) {
    await db.query(`
      INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to, trainer_name,
        trainer_membership_id, issued_by_membership_id, result, expires_on, taken_elsewhere, imported, confirmed_at)
      SELECT :clubId, x.membership_id, x.course_id, x.trainee_name, x.subject, x.on, x.on, x.assessor, NULL, :me, 'pass', x.expires_on, true, true, NULL
      FROM jsonb_to_recordset(:rows::jsonb) AS x(membership_id uuid, course_id uuid, trainee_name text, subject text, "on" date, assessor text, expires_on date)`,
    { replacements: { clubId, me: actor.membership.id, rows: json(records) }, transaction })
  }
  const tiers = all.flatMap(p => p.tiers.map(t => ({ membership_id: p.now.membership_id, rank: t.rank, on: t.on, assessor: t.assessor, expires_on: t.expiresOn })))
  if (tiers.length) {
    await db.query(`
      INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on, imported, imported_assessor_name, confirmed_at)
      SELECT :clubId, x.membership_id, x.rank, x.on, x.on, x.expires_on, true, x.assessor, NULL
      FROM jsonb_to_recordset(:rows::jsonb) AS x(membership_id uuid, rank integer, "on" date, assessor text, expires_on date)
      ON CONFLICT (membership_id, rank) DO NOTHING`,
    { replacements: { clubId, rows: json(tiers) }, transaction })
  }
  if (audits.length) {
    // The same row recordAudit writes, for the whole batch in one INSERT.
    await AuditEvent.bulkCreate(audits.map(a => ({
      clubId, actorMembershipId: actor.membership.id, actorName: null, action: 'member.imported', subjectType: 'membership',
      subjectId: a.subjectId, before: a.before, after: a.after, reason: null,
    })), { transaction })
  }
  return counts
}
