import { IdParamSchema } from '#shared/schemas/common'
import { ImportedRejectSchema } from '#shared/schemas/imported'
import { rejectImportedRecord } from '../../../../services/training'

/** An instructor rejects (deletes) an unconfirmed imported training record, with the reason; audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  const { reason } = await validBody(event, ImportedRejectSchema)
  const { id } = validParams(event, IdParamSchema)
  return rejectImportedRecord(actor, id, reason)
})
