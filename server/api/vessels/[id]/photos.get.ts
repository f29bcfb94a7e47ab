import { IdParamSchema } from '#shared/schemas/common'
import { listVesselPhotos } from '../../../services/photos'

/** A vessel's photos, oldest first, for whoever may see the vessel; 404 for another member's or a missing one. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const photos = await listVesselPhotos(photoViewerOf(actor), id)
  if (!photos) notFound('No such vessel')
  return photos
})
