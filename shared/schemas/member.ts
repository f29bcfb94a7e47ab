import { z } from 'zod'
import { ROLES } from '../utils/permissions'
import { MEMBERSHIP_STATUSES } from '../utils/membership-status'
import { emailField, isoDate, optionalText, PageQuerySchema } from './common'

const phone = z.string().trim().max(40, 'At most 40 characters')
  .regex(/^[+()\d\s-]*$/, 'Digits, spaces, +, -, ( and ) only')
  .transform(v => (v === '' ? null : v)).nullable().optional()

/** What a member edits about themselves. */
export const ProfileSchema = z.object({
  name: z.string().trim().min(1, 'Enter your name').max(120, 'At most 120 characters'),
  phone,
  emergencyContactName: optionalText(120),
  emergencyContactPhone: phone,
  unitPreference: z.enum(['bar', 'psi']),
})
export type Profile = z.infer<typeof ProfileSchema>

/** What an admin edits on a member: the profile plus birth date and guardian. */
export const MemberEditSchema = ProfileSchema.extend({
  // '' (a cleared date input) clears the birth date.
  birthDate: z.preprocess(v => (v === '' ? null : v), isoDate.nullable().optional()),
  guardianName: optionalText(120),
  guardianEmail: z.union([emailField, z.literal('')]).transform(v => (v === '' ? null : v)).nullable().optional(),
}).partial().refine(v => Object.keys(v).length > 0, 'Nothing to change')
export type MemberEdit = z.infer<typeof MemberEditSchema>

export const MEMBER_SORT_FIELDS = ['name', 'email', 'paidThrough', 'joined'] as const

export const MemberDirectoryQuerySchema = PageQuerySchema.extend({
  q: z.string().trim().max(100, 'At most 100 characters').optional(),
  status: z.enum(MEMBERSHIP_STATUSES).optional(),
  role: z.enum(ROLES).optional(),
  sort: z.enum(MEMBER_SORT_FIELDS).default('name'),
  dir: z.enum(['asc', 'desc']).default('asc'),
})
export type MemberDirectoryQuery = z.infer<typeof MemberDirectoryQuerySchema>

export const reasonField = z.string().trim().min(3, 'Give a reason (at least 3 characters)').max(500, 'At most 500 characters')

/** Suspend, resign and other membership actions carry a reason for the audit trail. */
export const MembershipActionSchema = z.object({ reason: reasonField })
export type MembershipAction = z.infer<typeof MembershipActionSchema>

export const RolesSchema = z.object({
  roles: z.array(z.enum(ROLES)).max(ROLES.length),
  reason: reasonField,
})
export type RolesChange = z.infer<typeof RolesSchema>
