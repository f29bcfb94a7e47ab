import { z } from 'zod'

// Records a roster import brought in unconfirmed, and the welcome e-mail of imported accounts.

/** Confirming one unconfirmed imported training record or tier: the assessor says so explicitly. */
export const ImportedConfirmSchema = z.object({
  confirm: z.literal(true, { errorMap: () => ({ message: 'Confirm that you vouch for this record' }) }),
}).strict()
export type ImportedConfirm = z.infer<typeof ImportedConfirmSchema>

/** Rejecting (deleting) one unconfirmed imported training record or tier: why, for the audit trail. */
export const ImportedRejectSchema = z.object({
  reason: z.string().trim().min(1, 'Give the reason').max(500, 'At most 500 characters'),
}).strict()
export type ImportedReject = z.infer<typeof ImportedRejectSchema>

/** Sending the welcome to every imported member not welcomed yet: confirmed, as it e-mails many people. */
export const WelcomeSendSchema = z.object({
  confirm: z.literal(true, { errorMap: () => ({ message: 'Confirm that the welcome e-mails are to be sent' }) }),
}).strict()
export type WelcomeSend = z.infer<typeof WelcomeSendSchema>
