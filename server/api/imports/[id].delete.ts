import { ImportJobParamSchema } from '#shared/schemas/club-data'
import { cancelImport } from '../../services/club-data'

/** Drops an import that has not started (members.import): its file and staging rows are deleted. 204. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.import')
  const { id } = validParams(event, ImportJobParamSchema)
  await cancelImport(actor, id, await uploadsDir())
  setResponseStatus(event, 204)
  return null
})
