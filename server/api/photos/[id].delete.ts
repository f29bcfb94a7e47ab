import { IdParamSchema } from '#shared/schemas/common'
import { removePhoto } from '../../services/photos'

/** Removes a photo: its uploader or the safety officer; one a recorded test points at stays (422). 204. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  await removePhoto(photoViewerOf(actor), id, await uploadsDir())
  setResponseStatus(event, 204)
  return null
})
