import { PHOTO_MAX_BYTES, PhotoUploadFieldsSchema } from '#shared/schemas/photo'
import { statusKeepsRights } from '#shared/utils/membership-status'
import { addPhoto } from '../../services/photos'

/**
 * Uploads one photo (multipart: `purpose`, `vesselId`, optional `caption`, the image in `file`),
 * streamed to disk with a 10 MB limit, then re-encoded without metadata. 201 with the photo.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  if (!statusKeepsRights(actor.status)) throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only an active member uploads photos' })
  const dir = await uploadsDir()
  const upload = await receiveUpload(event, { dir, fileField: 'file', maxFileBytes: PHOTO_MAX_BYTES, what: 'photo' })
  try {
    const fields = validFields(upload.fields, PhotoUploadFieldsSchema)
    if (!upload.file?.bytes) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'file: Choose a photo to upload', data: { fields: { file: 'Choose a photo to upload' } } })
    const photo = await addPhoto(photoViewerOf(actor), fields, upload.file.path, dir)
    setResponseStatus(event, 201)
    return photo
  }
  finally {
    await discardUpload(upload)
  }
})
