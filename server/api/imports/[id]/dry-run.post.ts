import { ImportJobParamSchema, ImportMappingSchema } from '#shared/schemas/club-data'
import { dryRunImport } from '../../../services/club-data'

/** The dry run with the admin's mapping (members.import): every row checked, nothing written but the staging rows. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.import')
  const { id } = validParams(event, ImportJobParamSchema)
  const mapping = await validBody(event, ImportMappingSchema)
  return dryRunImport(actor, id, mapping, await uploadsDir())
})
