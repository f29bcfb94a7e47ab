import { join } from 'node:path'
import { IdParamSchema } from '#shared/schemas/common'
import { findVisiblePhoto, photoFileName } from '../../services/photos'

/** A photo's image, for whoever may see it (the vessel's viewers; any member for a coupon photo); 404 otherwise. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const photo = await findVisiblePhoto(photoViewerOf(actor), id)
  if (!photo) notFound('No such photo')
  const name = photoFileName(photo)
  return sendPhotoFile(event, join(await uploadsDir(), name), photo.contentType, name)
})
