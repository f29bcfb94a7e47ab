import { z } from 'zod'
import { reasonField } from './member'

/**
 * Erasing a member on request: the member's name typed again (the second step of the confirmation,
 * compared with the name on record, any case) and the reason, which the audit trail keeps without
 * the member's name, e-mail or phone.
 */
export const EraseMemberSchema = z.object({
  confirmName: z.string().trim().min(1, 'Type the member\'s name to confirm').max(120, 'At most 120 characters'),
  reason: reasonField,
})
export type EraseMember = z.infer<typeof EraseMemberSchema>
