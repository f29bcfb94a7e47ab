import { z } from 'zod'
import { ROLES } from '../utils/permissions'
import { isJunior, MEMBERSHIP_STATUSES } from '../utils/membership-status'
import { emailField, isoDate, nameField, optionalName, PageQuerySchema } from './common'
import { EARLIEST_BIRTH_DATE } from './auth'

const phone = z.string().trim().max(40, 'At most 40 characters')
  .regex(/^[+()\d\s-]*$/, 'Digits, spaces, +, -, ( and ) only')
  .transform(v => (v === '' ? null : v)).nullable().optional()

/** What a member edits about themselves. */
export const ProfileSchema = z.object({
  name: nameField(),
  phone,
  emergencyContactName: optionalName(),
  emergencyContactPhone: phone,
  unitPreference: z.enum(['bar', 'psi']),
})
export type Profile = z.infer<typeof ProfileSchema>

/**
 * What every reason field tells the officer writing it: the audit trail can never be changed or
 * erased, so a reason must not carry what a member may later ask to have erased.
 */
export const REASON_HINT = 'Kept in the audit trail for good: no personal details (no names, contact details, health or family matters).'

export const reasonField = z.string().trim().min(3, 'Give a reason (at least 3 characters)').max(500, 'At most 500 characters')
  .describe(REASON_HINT)

/** What an admin edits on a member: the profile plus birth date and guardian, and an optional reason for the audit trail. */
export const MemberEditSchema = ProfileSchema.extend({
  // '' (a cleared date input) clears the birth date. Before 1900 is a typing slip (and year 0 is no date at all).
  birthDate: z.preprocess(v => (v === '' ? null : v), isoDate
    .refine(v => v >= EARLIEST_BIRTH_DATE, 'Check the year of the birth date').nullable().optional()),
  guardianName: optionalName(),
  guardianEmail: z.union([emailField, z.literal('')]).transform(v => (v === '' ? null : v)).nullable().optional(),
  // A blank reason is no reason.
  reason: z.preprocess(v => (typeof v === 'string' && v.trim() === '' ? undefined : v), reasonField.optional()),
}).partial().refine(v => Object.keys(v).some(k => k !== 'reason'), 'Nothing to change')
export type MemberEdit = z.infer<typeof MemberEditSchema>

export interface FieldIssue { path: string, message: string }

/**
 * The junior rule for a member's details after an edit: someone under 18 on `today` (the club's
 * calendar date) names a guardian with an e-mail of their own (not the member's `email`).
 */
export function juniorGuardianIssues(
  v: { birthDate?: string | null, guardianName?: string | null, guardianEmail?: string | null },
  today: string,
  email?: string | null,
): FieldIssue[] {
  if (!v.birthDate || !isoDate.safeParse(v.birthDate).success || !isJunior(v.birthDate, today)) return []
  const issues: FieldIssue[] = []
  if (!v.guardianName) issues.push({ path: 'guardianName', message: 'Members under 18 name a parent or guardian' })
  if (!v.guardianEmail) issues.push({ path: 'guardianEmail', message: 'Enter the guardian\'s e-mail: we ask them for consent' })
  else if (email && v.guardianEmail.toLowerCase() === email.toLowerCase()) {
    issues.push({ path: 'guardianEmail', message: 'Use the guardian\'s own e-mail, not the member\'s' })
  }
  return issues
}

/** The issue for a birth date after `today` (YYYY-MM-DD, the club's date), or null. */
export function futureBirthDateIssue(birthDate: string | null | undefined, today: string): FieldIssue | null {
  return birthDate && birthDate > today ? { path: 'birthDate', message: 'The birth date cannot be in the future' } : null
}

/**
 * The admin's edit form: MemberEditSchema plus the rules that depend on the date (no birth date in
 * the future; the junior rule on the values in the form). The form passes the browser's date; the
 * server applies the same rules to the stored values merged with the edit, with the club's date.
 */
export function memberEditFormSchemaFor(today: string) {
  return MemberEditSchema.superRefine((v, ctx) => {
    const future = futureBirthDateIssue(v.birthDate, today)
    const issues = future ? [future] : juniorGuardianIssues(v, today)
    for (const issue of issues) ctx.addIssue({ code: 'custom', path: [issue.path], message: issue.message })
  })
}

export const MEMBER_SORT_FIELDS = ['name', 'email', 'paidThrough', 'joined'] as const

export const MemberDirectoryQuerySchema = PageQuerySchema.extend({
  q: z.string().trim().max(100, 'At most 100 characters').optional(),
  status: z.enum(MEMBERSHIP_STATUSES).optional(),
  role: z.enum(ROLES).optional(),
  sort: z.enum(MEMBER_SORT_FIELDS).default('name'),
  dir: z.enum(['asc', 'desc']).default('asc'),
})
export type MemberDirectoryQuery = z.infer<typeof MemberDirectoryQuerySchema>

/** Suspend, resign and other membership actions carry a reason for the audit trail. */
export const MembershipActionSchema = z.object({ reason: reasonField })
export type MembershipAction = z.infer<typeof MembershipActionSchema>

export const RolesSchema = z.object({
  roles: z.array(z.enum(ROLES)).max(ROLES.length),
  reason: reasonField,
})
export type RolesChange = z.infer<typeof RolesSchema>
