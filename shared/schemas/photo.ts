import { z } from 'zod'
import { optionalText } from './common'

/** What a photo shows: a build stage of a vessel, its gauge at a proof test, a burst coupon, or an incident. */
export const PHOTO_PURPOSES = ['build', 'gauge', 'coupon', 'incident'] as const
export type PhotoPurpose = typeof PHOTO_PURPOSES[number]

/** The image types an upload may be (judged from its content, never its name); each is kept in its own format. */
export const PHOTO_CONTENT_TYPES = ['image/jpeg', 'image/png', 'image/webp'] as const
export type PhotoContentType = typeof PHOTO_CONTENT_TYPES[number]

/** The largest photo file taken, in bytes (10 MB); the upload stops reading beyond it (413). */
export const PHOTO_MAX_BYTES = 10 * 1024 * 1024

/** The longest caption kept (the photos table checks it too). */
export const PHOTO_CAPTION_MAX = 200

/**
 * The text fields of a photo upload (multipart, beside the file field `file`). Build and gauge photos
 * belong to a vessel; a coupon's photo belongs to its coupon test, so it names no vessel.
 */
export const PhotoUploadFieldsSchema = z.object({
  purpose: z.enum(PHOTO_PURPOSES, { errorMap: () => ({ message: 'Choose build, gauge, coupon or incident' }) }),
  vesselId: z.string().uuid('Not a valid vessel id').transform(id => id.toLowerCase()).optional(),
  incidentId: z.string().uuid('Not a valid incident id').transform(id => id.toLowerCase()).optional(),
  caption: optionalText(PHOTO_CAPTION_MAX)
    .refine(v => !v || !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v), 'Use one line of visible characters'),
}).strict().superRefine((v, ctx) => {
  const ownsVessel = v.purpose === 'build' || v.purpose === 'gauge'
  if (ownsVessel && !v.vesselId) ctx.addIssue({ code: 'custom', path: ['vesselId'], message: 'Name the vessel the photo shows' })
  if (!ownsVessel && v.vesselId) ctx.addIssue({ code: 'custom', path: ['vesselId'], message: `A ${v.purpose} photo belongs to its ${v.purpose === 'coupon' ? 'coupon test' : 'incident report'}, not to a vessel` })
  if (v.purpose === 'incident' && !v.incidentId) ctx.addIssue({ code: 'custom', path: ['incidentId'], message: 'Name the incident the photo belongs to' })
  if (v.purpose !== 'incident' && v.incidentId) ctx.addIssue({ code: 'custom', path: ['incidentId'], message: 'Only an incident photo names an incident' })
})
export type PhotoUploadFields = z.infer<typeof PhotoUploadFieldsSchema>
