import { z } from 'zod'
import { ROLES } from '../utils/permissions'
import {
  DATE_FORMATS, IMPORT_FIELDS, IMPORT_FIELD_LABELS, REQUIRED_IMPORT_FIELDS, mappedCells, readDateCell, readRolesCell, readTierCell,
  type DateFormat, type ImportField,
} from '../utils/import-fields'
import { emailField, isoDate, nameField } from './common'
import { futureBirthDateIssue, juniorGuardianIssues, MemberEditSchema, ProfileSchema } from './member'

/** The largest roster file an admin may upload (20 MB: about 100 000 rows of a typical spreadsheet). */
export const IMPORT_MAX_BYTES = 20 * 1024 * 1024
/** The most data rows one import reads. */
export const IMPORT_MAX_ROWS = 100_000
/** The most columns a roster file may have. */
export const IMPORT_MAX_COLUMNS = 200

const column = z.number().int().min(0).max(IMPORT_MAX_COLUMNS - 1).nullable().optional()

/** The mapping step: a column index per Hoopwise field (name and e-mail required) and the file's date format. */
export const ImportMappingSchema = z.object({
  columns: z.object(Object.fromEntries(IMPORT_FIELDS.map(f => [f, column])) as Record<ImportField, typeof column>)
    .superRefine((cols, ctx) => {
      for (const f of REQUIRED_IMPORT_FIELDS) {
        if (cols[f] === undefined || cols[f] === null) ctx.addIssue({ code: 'custom', path: [f], message: `Choose the column that holds the ${IMPORT_FIELD_LABELS[f].toLowerCase()}` })
      }
      const used = new Map<number, ImportField>()
      for (const f of IMPORT_FIELDS) {
        const c = cols[f]
        if (c === undefined || c === null) continue
        if (used.has(c)) ctx.addIssue({ code: 'custom', path: [f], message: `That column is already mapped to ${IMPORT_FIELD_LABELS[used.get(c)!].toLowerCase()}` })
        used.set(c, f)
      }
    }),
  dateFormat: z.enum(DATE_FORMATS),
})
export type ImportMapping = z.infer<typeof ImportMappingSchema>

const editShape = MemberEditSchema.innerType().shape

/**
 * One roster row after its cells were read: the SAME field schemas as the profile and member edit
 * forms (name, phone, emergency contact, birth date, guardian) and sign-up's e-mail, plus what only
 * an import brings: paid-through, plan, roles, one past training record and one tier.
 */
export const ImportRowSchema = z.object({
  name: nameField('Enter the member\'s name'),
  email: emailField,
  phone: ProfileSchema.shape.phone,
  emergencyContactName: ProfileSchema.shape.emergencyContactName,
  emergencyContactPhone: ProfileSchema.shape.emergencyContactPhone,
  birthDate: editShape.birthDate,
  guardianName: editShape.guardianName,
  guardianEmail: editShape.guardianEmail,
  paidThrough: isoDate.nullable().optional(),
  plan: z.string().trim().max(80, 'At most 80 characters').nullable().optional(),
  roles: z.array(z.enum(ROLES)).max(ROLES.length).optional(),
  training: z.object({
    course: z.string().trim().min(1, 'Name the course').max(120, 'At most 120 characters'),
    trainedOn: isoDate,
    assessorName: nameField('Name the assessor'),
  }).nullable().optional(),
  tier: z.object({
    rank: z.number().int().min(0).max(4),
    signedOn: isoDate,
    assessorName: nameField('Name the assessor'),
  }).nullable().optional(),
})
export type ImportRow = z.infer<typeof ImportRowSchema>

/** A refused field of a row and why. */
export interface ImportIssue { field: string, reason: string }

export type CheckedRow = { row: ImportRow } | { issues: ImportIssue[] }

/** The mapping field of a nested schema path (training.course → trainingCourse). */
const NESTED_FIELDS: Record<string, ImportField> = {
  'training.course': 'trainingCourse', 'training.trainedOn': 'trainedOn', 'training.assessorName': 'trainingAssessor',
  'tier.rank': 'tierRank', 'tier.signedOn': 'tierSignedOn', 'tier.assessorName': 'tierAssessor',
}

const DATE_FIELDS = ['birthDate', 'paidThrough', 'trainedOn', 'tierSignedOn'] as const
const fieldLabel = (path: string) => IMPORT_FIELD_LABELS[path as ImportField] ?? path

/**
 * Checks one roster row: its mapped cells read (dates in `dateFormat`, roles, tier), then the row
 * schema, then the forms' date rules on the club's `today` (no birth date in the future; a junior
 * names a guardian with an e-mail of their own). The training and tier columns are all-or-nothing.
 */
export function checkImportRow(cells: readonly string[], columns: ImportMapping['columns'], dateFormat: DateFormat, today: string): CheckedRow {
  const raw = mappedCells(cells, columns)
  const issues: ImportIssue[] = []
  const dates: Partial<Record<typeof DATE_FIELDS[number], string | null>> = {}
  for (const f of DATE_FIELDS) {
    if (raw[f] === undefined) continue
    const read = readDateCell(raw[f]!, dateFormat)
    if ('error' in read) issues.push({ field: f, reason: read.error })
    else dates[f] = read.date
  }
  let roles: ImportRow['roles']
  if (raw.roles) {
    const read = readRolesCell(raw.roles)
    if ('error' in read) issues.push({ field: 'roles', reason: read.error })
    else roles = read.roles
  }
  let rank: number | null = null
  if (raw.tierRank) {
    const read = readTierCell(raw.tierRank)
    if ('error' in read) issues.push({ field: 'tierRank', reason: read.error })
    else rank = read.rank
  }
  const group = (fields: ImportField[], label: string): boolean => {
    const given = fields.filter(f => raw[f])
    if (given.length && given.length < fields.length) {
      for (const f of fields.filter(f => !raw[f])) issues.push({ field: f, reason: `${label}: give the course or tier, its date and the assessor together` })
    }
    return given.length === fields.length
  }
  const hasTraining = group(['trainingCourse', 'trainedOn', 'trainingAssessor'], 'Past training')
  const hasTier = group(['tierRank', 'tierSignedOn', 'tierAssessor'], 'Pressure tier')
  if (issues.length) return { issues }
  const parsed = ImportRowSchema.safeParse({
    name: raw.name ?? '',
    email: raw.email ?? '',
    phone: raw.phone || null,
    emergencyContactName: raw.emergencyContactName || null,
    emergencyContactPhone: raw.emergencyContactPhone || null,
    birthDate: dates.birthDate ?? null,
    guardianName: raw.guardianName || null,
    guardianEmail: raw.guardianEmail || null,
    paidThrough: dates.paidThrough ?? null,
    plan: raw.plan || null,
    roles,
    training: hasTraining ? { course: raw.trainingCourse, trainedOn: dates.trainedOn, assessorName: raw.trainingAssessor } : null,
    tier: hasTier ? { rank, signedOn: dates.tierSignedOn, assessorName: raw.tierAssessor } : null,
  })
  if (!parsed.success) {
    return {
      issues: parsed.error.issues.map((i) => {
        const [head, sub] = i.path.map(String)
        return { field: NESTED_FIELDS[`${head}.${sub}`] ?? head ?? 'row', reason: i.message }
      }),
    }
  }
  const row = parsed.data
  const future = futureBirthDateIssue(row.birthDate, today)
  const rules = future ? [future] : juniorGuardianIssues(row, today, row.email)
  if (rules.length) return { issues: rules.map(r => ({ field: r.path, reason: r.message })) }
  return { row }
}

/** Issues as one line for the refused rows' reason column: "Birth date: Not a calendar date; …". */
export function issuesText(issues: readonly ImportIssue[]): string {
  return issues.map(i => `${fieldLabel(i.field)}: ${i.reason}`).join('; ')
}

/** The import route's path parameter and the refused-rows download. */
export const ImportJobParamSchema = z.object({ id: z.string().uuid('Not a valid id').transform(id => id.toLowerCase()) })

/** Starting the import of a checked file: nothing to send but the admin's go. */
export const ImportRunSchema = z.object({ confirm: z.literal(true, { errorMap: () => ({ message: 'Confirm the import' }) }) })
export type ImportRun = z.infer<typeof ImportRunSchema>
