import { z } from 'zod'
import { AUDIT_ACTIONS, AUDIT_SUBJECT_TYPES } from '../utils/audit-actions'
import { PageQuerySchema } from './common'

/** An empty query value (a cleared filter) means "no filter". */
const blankToUndefined = (v: unknown) => (v === '' ? undefined : v)

/** The audit trail's query: a page, newest first, optionally one action, one kind of subject and/or one subject. */
export const AuditQuerySchema = PageQuerySchema.extend({
  action: z.preprocess(blankToUndefined, z.enum(AUDIT_ACTIONS, { message: 'Not an action the audit trail records' }).optional()),
  subjectType: z.preprocess(blankToUndefined, z.enum(AUDIT_SUBJECT_TYPES, { message: 'Not a kind of record the audit trail names' }).optional()),
  subjectId: z.preprocess(blankToUndefined, z.string().uuid('Not a valid id').optional()),
})
export type AuditQuery = z.infer<typeof AuditQuerySchema>
