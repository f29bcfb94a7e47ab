import { z } from 'zod'
import { PageQuerySchema } from './common'

/** An empty query value (a cleared filter) means "no filter". */
const blankToUndefined = (v: unknown) => (v === '' ? undefined : v)

/** The audit trail's query: a page, newest first, optionally one action and/or one subject. */
export const AuditQuerySchema = PageQuerySchema.extend({
  action: z.preprocess(blankToUndefined, z.string().trim().max(60, 'At most 60 characters')
    .regex(/^[a-z][a-z0-9_.]*$/, 'Lower-case letters, digits, dots and underscores only').optional()),
  subjectId: z.preprocess(blankToUndefined, z.string().uuid('Not a valid id').optional()),
})
export type AuditQuery = z.infer<typeof AuditQuerySchema>
