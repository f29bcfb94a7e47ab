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
