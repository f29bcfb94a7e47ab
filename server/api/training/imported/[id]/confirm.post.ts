import { IdParamSchema } from '#shared/schemas/common'
import { ImportedConfirmSchema } from '#shared/schemas/imported'
import { confirmImportedRecord } from '../../../../services/training'

/** An instructor confirms an imported training record: from now on it counts. 404, 409 confirmed already, 422 own record. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  await validBody(event, ImportedConfirmSchema)
  const { id } = validParams(event, IdParamSchema)
  return confirmImportedRecord(actor, id)
})
