import { z } from 'zod'
import { DESK_TABLES, DESK_WINDOWS } from '../utils/audit-desk'

/** A desk table named in the path. */
export const DeskTableParamSchema = z.object({ table: z.enum(DESK_TABLES, { message: 'Not a table of the audit desk' }) })

const blankToUndefined = (v: unknown) => (v === '' ? undefined : v)

/**
 * A desk table's query: sort (a column of the table: the service checks it), direction, the 30/60/90-day
 * window of an expiring table, a standing filter (`state`), free text, and the page.
 */
export const DeskQuerySchema = z.object({
  sort: z.preprocess(blankToUndefined, z.string().regex(/^[a-zA-Z]{1,40}$/, 'Not a column').optional()),
  dir: z.preprocess(blankToUndefined, z.enum(['asc', 'desc']).optional()),
  within: z.preprocess(blankToUndefined, z.coerce.number().int()
    .refine(d => (DESK_WINDOWS as readonly number[]).includes(d), 'Choose 30, 60 or 90 days').default(90)),
  state: z.preprocess(blankToUndefined, z.string().regex(/^[a-z_]{1,40}$/, 'Not a standing').optional()),
  q: z.preprocess(blankToUndefined, z.string().trim().max(80, 'At most 80 characters').optional()),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
})
export type DeskQuery = z.infer<typeof DeskQuerySchema>
