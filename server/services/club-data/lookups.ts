import { QueryTypes, type Transaction } from 'sequelize'
import { trainingExpiresOn } from '#shared/utils/training-validity'
import { tierExpiresOn } from '#shared/utils/tier-rules'
import type { ImportIssue, ImportRow } from '#shared/schemas/club-data'

/** The club's plans, courses and tier levels by the words a spreadsheet uses for them. */
export interface ClubLookups {
  plans: Map<string, string>
  courses: Map<string, { id: string, name: string, validityMonths: number }>
  tiers: Map<number, number>
}

/** Reads the lookups of club `clubId` once per dry run and per run: plans and courses by code or name (any case), tier validity by rank. */
export async function clubLookups(clubId: string): Promise<ClubLookups> {
  const db = useDb()
  const [plans, courses, tiers] = await Promise.all([
    db.query<{ id: string, code: string, name: string }>('SELECT id, code, name FROM dues_plans WHERE club_id = :clubId', { replacements: { clubId }, type: QueryTypes.SELECT }),
    db.query<{ id: string, code: string, name: string, validity_months: number }>('SELECT id, code, name, validity_months FROM courses WHERE club_id = :clubId', { replacements: { clubId }, type: QueryTypes.SELECT }),
    db.query<{ rank: number, validity_months: number }>('SELECT rank, validity_months FROM tier_levels WHERE club_id = :clubId', { replacements: { clubId }, type: QueryTypes.SELECT }),
  ])
  const lookups: ClubLookups = { plans: new Map(), courses: new Map(), tiers: new Map() }
  for (const p of plans) for (const k of [p.code, p.name]) lookups.plans.set(k.toLowerCase(), p.id)
  for (const c of courses) for (const k of [c.code, c.name]) lookups.courses.set(k.toLowerCase(), { id: c.id, name: c.name, validityMonths: c.validity_months })
  for (const t of tiers) lookups.tiers.set(t.rank, t.validity_months)
  return lookups
}

/** What a checked row means in this club: its plan, course and tier found, or why not. */
export function lookupIssues(row: ImportRow, lookups: ClubLookups): ImportIssue[] {
  const issues: ImportIssue[] = []
  if (row.plan && !lookups.plans.has(row.plan.toLowerCase())) issues.push({ field: 'plan', reason: `No dues plan is called "${row.plan}"` })
  if (row.training && !lookups.courses.has(row.training.course.toLowerCase())) issues.push({ field: 'trainingCourse', reason: `No course is called "${row.training.course}"` })
  if (row.tier && !lookups.tiers.has(row.tier.rank)) issues.push({ field: 'tierRank', reason: `The club has no tier T${row.tier.rank}` })
  return issues
}

/** A member as the import compares and updates them. */
export interface MemberNow {
  membership_id: string | null
  user_id: string
  email: string
  name: string
  roles: string[] | null
  paid_through: string | null
  dues_plan_id: string | null
  phone: string | null
  birth_date: string | null
  emergency_contact_name: string | null
  emergency_contact_phone: string | null
  guardian_name: string | null
  guardian_email: string | null
  course_dates: string[] | null
  tier_ranks: number[] | null
}

/**
 * The accounts (and their membership of club `clubId`, if any) with `emails` (lower-case), by e-mail:
 * one query for a whole batch.
 */
export async function membersByEmail(clubId: string, emails: readonly string[], transaction?: Transaction): Promise<Map<string, MemberNow>> {
  if (!emails.length) return new Map()
  // Joined from the list of e-mails, so each is one probe of the unique index on lower(email). Written
  // as `lower(email) IN (…)` the planner may pick the trigram index instead, and every address of a
  // batch sharing one domain then rechecks most of the table: seconds per batch, not milliseconds.
  const rows = await useDb().query<MemberNow>(`
    SELECT m.id AS membership_id, u.id AS user_id, e.email, u.name, m.roles, m.paid_through::text, m.dues_plan_id,
      m.phone, m.birth_date::text, m.emergency_contact_name, m.emergency_contact_phone, m.guardian_name, m.guardian_email,
      (SELECT array_agg(r.course_id || '@' || r.trained_to::text) FROM training_records r WHERE r.membership_id = m.id) AS course_dates,
      (SELECT array_agg(t.rank) FROM member_tiers t WHERE t.membership_id = m.id) AS tier_ranks
    FROM unnest(ARRAY[:emails]::text[]) AS e(email)
    JOIN users u ON lower(u.email) = e.email
    LEFT JOIN memberships m ON m.user_id = u.id AND m.club_id = :clubId`,
  { replacements: { clubId, emails }, type: QueryTypes.SELECT, transaction })
  return new Map(rows.map(r => [r.email, r]))
}

/** The contact fields an import fills in when given: row field → membership column. */
export const CONTACT_COLUMNS = {
  phone: 'phone',
  birthDate: 'birth_date',
  emergencyContactName: 'emergency_contact_name',
  emergencyContactPhone: 'emergency_contact_phone',
  guardianName: 'guardian_name',
  guardianEmail: 'guardian_email',
} as const satisfies Partial<Record<keyof ImportRow, keyof MemberNow>>

/** What importing `row` would change on `member` (an existing membership). */
export interface MemberChanges {
  contact: (keyof typeof CONTACT_COLUMNS)[]
  addRoles: string[]
  paidThrough: string | null
  planId: string | null
  training: boolean
  tier: boolean
}

/**
 * The changes `row` makes to existing `member`: a contact field given and different; roles the member
 * lacks (an import never removes one); a paid-through later than the one held (an import never moves
 * it back); a plan given and different; a training record or tier the member has not got. The name of
 * an existing account stays as it is (its member owns it).
 */
export function changesFor(row: ImportRow, member: MemberNow, lookups: ClubLookups): MemberChanges {
  const contact = (Object.keys(CONTACT_COLUMNS) as (keyof typeof CONTACT_COLUMNS)[])
    .filter(f => row[f] != null && row[f] !== member[CONTACT_COLUMNS[f]])
  const held = new Set(member.roles ?? [])
  const addRoles = (row.roles ?? []).filter(r => !held.has(r))
  const paidThrough = row.paidThrough && (!member.paid_through || row.paidThrough > member.paid_through) ? row.paidThrough : null
  const plan = row.plan ? lookups.plans.get(row.plan.toLowerCase()) ?? null : null
  const course = row.training ? lookups.courses.get(row.training.course.toLowerCase()) : undefined
  const training = !!course && !(member.course_dates ?? []).includes(`${course.id}@${row.training!.trainedOn}`)
  const tier = !!row.tier && !(member.tier_ranks ?? []).includes(row.tier.rank)
  return { contact, addRoles, paidThrough, planId: plan && plan !== member.dues_plan_id ? plan : null, training, tier }
}

/** Whether `c` changes anything. */
export function changesAnything(c: MemberChanges): boolean {
  return c.contact.length > 0 || c.addRoles.length > 0 || !!c.paidThrough || !!c.planId || c.training || c.tier
}

/** The expiry of an imported training record or tier, by the club's validity rules. */
export function importedExpiry(kind: 'training' | 'tier', on: string, validityMonths: number): string {
  return kind === 'training' ? trainingExpiresOn(on, validityMonths) : tierExpiresOn(on, validityMonths)
}
