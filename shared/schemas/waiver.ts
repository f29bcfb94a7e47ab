import { z } from 'zod'
import { nameField } from './common'

export const WaiverPublishSchema = z.object({
  title: z.string().trim().min(1, 'Enter a title').max(200, 'At most 200 characters'),
  body: z.string().trim().min(20, 'The waiver text needs at least 20 characters').max(20_000, 'At most 20 000 characters'),
})
export type WaiverPublish = z.infer<typeof WaiverPublishSchema>

/** Accepting the current version: the member types their name and names the version they read. */
export const WaiverAcceptSchema = z.object({
  version: z.number().int().min(1),
  typedName: nameField('Type your full name'),
})
export type WaiverAccept = z.infer<typeof WaiverAcceptSchema>

/**
 * The accept form: the typed name from the route's schema plus the "I have read it" box, which only
 * the form needs. The version comes from the text on screen.
 */
export const WaiverAcceptFormSchema = WaiverAcceptSchema.pick({ typedName: true }).extend({
  read: z.literal(true, { errorMap: () => ({ message: 'Tick the box once you have read the waiver' }) }),
})
export type WaiverAcceptForm = z.infer<typeof WaiverAcceptFormSchema>
