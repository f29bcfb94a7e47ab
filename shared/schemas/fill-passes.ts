import { z } from 'zod'

/** Issuing a new fill pass (`POST /api/me/fill-pass`): the member confirms that the old one stops working. */
export const FillPassRenewSchema = z.object({
  renew: z.literal(true, { errorMap: () => ({ message: 'Confirm that the old fill pass should stop working' }) }),
}).strict()

/**
 * A fill-pass token as its address carries it (43 base64url characters). A token of another shape is
 * refused like a forged one (404), not as bad input: whoever scans a stranger's code gets one answer.
 */
export const FillPassTokenParamSchema = z.object({ token: z.string().max(1000) })

/** The launch event a fill desk is opened for (`GET /api/events/[id]/fill-desk`). */
export const FillDeskParamSchema = z.object({ id: z.string().uuid().transform(id => id.toLowerCase()) })
