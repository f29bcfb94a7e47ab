import { z } from 'zod'
import { NOTICE_STATUSES } from '../utils/notice-status'
import { PageQuerySchema } from './common'

export { NOTICE_STATUSES }

export const OutboxQuerySchema = PageQuerySchema.extend({
  status: z.enum(NOTICE_STATUSES).optional(),
  kind: z.string().trim().max(60).regex(/^[a-z_]*$/, 'Unknown kind').optional(),
})
export type OutboxQuery = z.infer<typeof OutboxQuerySchema>

export const OptOutSchema = z.object({ token: z.string().min(10).max(400) })
export type OptOut = z.infer<typeof OptOutSchema>

/** A notice kind's name as it travels in requests (the server checks it is a real kind). */
export const noticeKindField = z.string().trim().regex(/^[a-z_]{2,60}$/, 'Unknown kind')

/** The member's own e-mail settings: the optional kinds they switched off. */
export const NoticeSettingsSchema = z.object({
  optOuts: z.array(noticeKindField).max(50, 'Too many kinds'),
})
export type NoticeSettings = z.infer<typeof NoticeSettingsSchema>
