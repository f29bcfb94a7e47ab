/**
 * The roster import's words and pure rules: the Hoopwise fields a file's columns map to, the guess
 * of a mapping from the file's headings, and the reading of date, role and tier cells. The server's
 * dry run and the mapping page both use them, so what the page previews is what the import reads.
 */
import { isoDate } from '../schemas/common'
import { ROLES, ROLE_LABELS, type Role } from './permissions'

export const IMPORT_FIELDS = [
  'name', 'email', 'phone', 'birthDate', 'paidThrough', 'plan', 'roles',
  'emergencyContactName', 'emergencyContactPhone', 'guardianName', 'guardianEmail',
  'trainingCourse', 'trainedOn', 'trainingAssessor',
  'tierRank', 'tierSignedOn', 'tierAssessor',
] as const
export type ImportField = typeof IMPORT_FIELDS[number]

/** Fields every mapping names: a member is found by e-mail and needs a name. */
export const REQUIRED_IMPORT_FIELDS: readonly ImportField[] = ['name', 'email']

/** Each field's label on the mapping page and in a refused row's reason. */
export const IMPORT_FIELD_LABELS: Record<ImportField, string> = {
  name: 'Name',
  email: 'E-mail',
  phone: 'Phone',
  birthDate: 'Birth date',
  paidThrough: 'Paid through',
  plan: 'Dues plan',
  roles: 'Roles',
  emergencyContactName: 'Emergency contact name',
  emergencyContactPhone: 'Emergency contact phone',
  guardianName: 'Guardian name',
  guardianEmail: 'Guardian e-mail',
  trainingCourse: 'Past training: course',
  trainedOn: 'Past training: trained on',
  trainingAssessor: 'Past training: assessor name',
  tierRank: 'Pressure tier: rank',
  tierSignedOn: 'Pressure tier: signed on',
  tierAssessor: 'Pressure tier: assessor name',
}

/** Headings (lower-case, letters and digits only) that suggest a field; the leftmost such column wins. */
const HEADING_HINTS: Record<ImportField, string[]> = {
  name: ['name', 'fullname', 'membername', 'member'],
  email: ['email', 'emailaddress', 'mail'],
  phone: ['phone', 'telephone', 'mobile', 'tel', 'phonenumber'],
  birthDate: ['birthdate', 'dateofbirth', 'dob', 'born', 'birthday'],
  paidThrough: ['paidthrough', 'paiduntil', 'paidto', 'duespaidthrough', 'renewaldate', 'expires'],
  plan: ['plan', 'duesplan', 'membershiptype', 'category'],
  roles: ['roles', 'role'],
  emergencyContactName: ['emergencycontact', 'emergencycontactname', 'emergencyname', 'ice'],
  emergencyContactPhone: ['emergencyphone', 'emergencycontactphone', 'icephone'],
  guardianName: ['guardian', 'guardianname', 'parent', 'parentname'],
  guardianEmail: ['guardianemail', 'parentemail'],
  trainingCourse: ['course', 'training', 'trainingcourse'],
  trainedOn: ['trainedon', 'trainingdate', 'coursedate'],
  trainingAssessor: ['trainer', 'assessor', 'trainingassessor', 'instructor'],
  tierRank: ['tier', 'tierrank', 'pressuretier'],
  tierSignedOn: ['tiersignedon', 'tierdate', 'signedon'],
  tierAssessor: ['tierassessor', 'signedby'],
}

const headingKey = (h: string) => h.toLowerCase().replace(/[^a-z0-9]/g, '')

/** A column index per field guessed from the file's `headings` (each column used once, unknown ones left out). */
export function suggestMapping(headings: readonly string[]): Partial<Record<ImportField, number>> {
  const keys = headings.map(headingKey)
  const taken = new Set<number>()
  const mapping: Partial<Record<ImportField, number>> = {}
  for (const field of IMPORT_FIELDS) {
    const index = keys.findIndex((k, i) => !taken.has(i) && HEADING_HINTS[field].includes(k))
    if (index >= 0) {
      mapping[field] = index
      taken.add(index)
    }
  }
  return mapping
}

/** The raw text of each mapped field in one row of `cells` (trimmed; a missing cell is ''). */
export function mappedCells(cells: readonly string[], mapping: Partial<Record<ImportField, number | null>>): Partial<Record<ImportField, string>> {
  const out: Partial<Record<ImportField, string>> = {}
  for (const field of IMPORT_FIELDS) {
    const index = mapping[field]
    if (index === undefined || index === null) continue
    out[field] = (cells[index] ?? '').trim()
  }
  return out
}

export const DATE_FORMATS = ['auto', 'ymd', 'dmy', 'mdy'] as const
export type DateFormat = typeof DATE_FORMATS[number]

export const DATE_FORMAT_LABELS: Record<DateFormat, string> = {
  auto: 'Not chosen: only dates that can be read one way (2024-03-25, 25/03/2024)',
  ymd: 'Year first: 2024-03-05',
  dmy: 'Day first: 05/03/2024 (5 March)',
  mdy: 'Month first: 03/05/2024 (March 5)',
}

export type DateCell = { date: string | null } | { error: string }

/**
 * Reads one date cell as YYYY-MM-DD. Year-first dates (2024-03-05, 2024/3/5) read the same in every
 * format. Day and month first (separated by / . or -) follow `format`; without a chosen format a date
 * is read only when one of its first two numbers is above 12 (or both are equal), and 03/05/2024 is
 * refused as ambiguous — a wrong guess would move a birth date or a paid-through date by months.
 * Two-digit years are refused (1924 or 2024?). An empty cell is no date.
 */
export function readDateCell(value: string, format: DateFormat): DateCell {
  const v = value.trim()
  if (v === '') return { date: null }
  let y: string, m: string, d: string
  const yearFirst = v.match(/^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})$/)
  const yearLast = v.match(/^(\d{1,2})[-/.](\d{1,2})[-/.](\d+)$/)
  if (yearFirst) [, y, m, d] = yearFirst as unknown as [string, string, string, string]
  else if (yearLast) {
    const [, a, b, year] = yearLast as unknown as [string, string, string, string]
    if (year.length !== 4) return { error: 'Write the year with four digits' }
    y = year
    if (format === 'dmy') [d, m] = [a, b]
    else if (format === 'mdy') [m, d] = [a, b]
    else if (format === 'ymd') return { error: 'Not year first, as the chosen date format says' }
    else if (Number(a) > 12) [d, m] = [a, b]
    else if (Number(b) > 12) [m, d] = [a, b]
    else if (a === b) [d, m] = [a, b]
    else return { error: 'Ambiguous date (day or month first?): choose the file\'s date format' }
  }
  else return { error: 'Not a date (use the chosen date format)' }
  const iso = `${y}-${m.padStart(2, '0')}-${d.padStart(2, '0')}`
  return isoDate.safeParse(iso).success ? { date: iso } : { error: 'Not a calendar date' }
}

export type RolesCell = { roles: Role[] } | { error: string }

/** Reads a roles cell ("Instructor; safety officer", "instructor,admin"): codes or labels, any case, separated by , ; | or /. */
export function readRolesCell(value: string): RolesCell {
  const words = value.split(/[,;|/]/).map(w => w.trim().toLowerCase()).filter(Boolean)
  const roles = new Set<Role>()
  for (const word of words) {
    const role = ROLES.find(r => r === word.replace(/\s+/g, '_') || ROLE_LABELS[r].toLowerCase() === word)
    if (!role) return { error: `"${word}" is not a role (${ROLES.map(r => ROLE_LABELS[r]).join(', ')})` }
    roles.add(role)
  }
  return { roles: ROLES.filter(r => roles.has(r)) }
}

export type TierCell = { rank: number | null } | { error: string }

/** Reads a tier cell: a rank 0–4, written "2" or "T2". */
export function readTierCell(value: string): TierCell {
  const v = value.trim()
  if (v === '') return { rank: null }
  const m = v.match(/^t?([0-4])$/i)
  return m ? { rank: Number(m[1]) } : { error: 'A tier is T0 to T4 (or 0 to 4)' }
}
