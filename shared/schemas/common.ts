import { z } from 'zod'

/** A UUID route parameter, e.g. `/api/members/:id`. */
// Lower-cased: PostgreSQL matches UUIDs in any case, so comparisons in code must see one spelling.
export const IdParamSchema = z.object({ id: z.string().uuid('Not a valid id').transform(id => id.toLowerCase()) })
export type IdParam = z.infer<typeof IdParamSchema>

/** Optional text field: trims, turns '' into null, caps the length. */
export const optionalText = (max: number) =>
  z.string().trim().max(max, `At most ${max} characters`).transform(v => (v === '' ? null : v)).nullable().optional()

export const emailField = z.string().trim().toLowerCase().min(3, 'Enter an e-mail address').max(254, 'At most 254 characters')
  .email('Enter a valid e-mail address')

/** Calendar date as YYYY-MM-DD that exists on the calendar. */
export const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD').refine((v) => {
  const d = new Date(`${v}T00:00:00Z`)
  return !Number.isNaN(d.getTime()) && d.toISOString().startsWith(v)
}, 'Not a calendar date')

export const PageQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
})

/** The longest name we keep (a member's, an emergency contact's, a guardian's, a typed signature). */
export const NAME_MAX = 120

// A name is one printable line. Refused: control characters and line or paragraph separators (a name
// travels into e-mail headers and one-line lists), format characters — bidirectional overrides and
// isolates (U+202A–U+202E, U+2066–U+2069), zero-width spaces and joiners (U+200B–U+200F, U+2060,
// U+FEFF), soft hyphens — which make one name read as another, private-use and lone surrogate code
// points, and the blank letters (Hangul fillers, braille blank, combining grapheme joiner) that look
// like nothing at all.
const HIDDEN_OR_CONTROL = /[\p{Cc}\p{Cf}\p{Cs}\p{Co}\p{Zl}\p{Zp}\u034F\u115F\u1160\u2800\u3164\uFFA0]/u
// More marks than any script stacks on one letter is text drawn over its neighbours.
const STACKED_MARKS = /\p{M}{4,}/u

/** Why `value` (already trimmed) is not a name we keep, or null when it is one. */
export function nameIssue(value: string): string | null {
  if (value === '') return null
  if (HIDDEN_OR_CONTROL.test(value)) return 'Use one line of visible characters (no line breaks, hidden or control characters)'
  if (STACKED_MARKS.test(value)) return 'Too many accents on one letter'
  if (!/\p{L}/u.test(value)) return 'A name needs at least one letter'
  return null
}

const printableLine = (schema: z.ZodString) => schema.superRefine((v, ctx) => {
  const issue = nameIssue(v)
  if (issue) ctx.addIssue({ code: 'custom', message: issue })
})

/**
 * A person's name (sign-up, profile, member edit, the waiver's typed name): one printable line,
 * trimmed, 1–120 characters, stored in Unicode normal form C (so look-alike spellings compare equal).
 */
export const nameField = (requiredMessage = 'Enter your name') =>
  printableLine(z.string().trim().min(1, requiredMessage).max(NAME_MAX, `At most ${NAME_MAX} characters`))
    .transform(v => v.normalize('NFC'))

/** An optional name (emergency contact, guardian): the same rule; '' becomes null. */
export const optionalName = () =>
  printableLine(z.string().trim().max(NAME_MAX, `At most ${NAME_MAX} characters`))
    .transform(v => (v === '' ? null : v.normalize('NFC'))).nullable().optional()
