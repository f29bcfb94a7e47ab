import { z } from 'zod'
import { PageQuerySchema } from './common'

export const NOTICE_STATUSES = ['queued', 'sending', 'sent', 'failed', 'skipped'] as const

export const OutboxQuerySchema = PageQuerySchema.extend({
  status: z.enum(NOTICE_STATUSES).optional(),
  kind: z.string().trim().max(60).regex(/^[a-z_]*$/, 'Unknown kind').optional(),
})
export type OutboxQuery = z.infer<typeof OutboxQuerySchema>

export const OptOutSchema = z.object({ token: z.string().min(10).max(400) })
export type OptOut = z.infer<typeof OptOutSchema>
