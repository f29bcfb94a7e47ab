import { join } from 'node:path'
import { IdParamSchema } from '#shared/schemas/common'
import { findVisiblePhoto, photoFileName } from '../../../services/photos'

/** A photo's thumbnail (at most 320 px wide), for whoever may see the photo; 404 otherwise. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const photo = await findVisiblePhoto(photoViewerOf(actor), id)
  if (!photo) notFound('No such photo')
  const name = photoFileName(photo, 'thumbnail')
  return sendPhotoFile(event, join(await uploadsDir(), name), photo.contentType, name)
})
