import { IdParamSchema } from '#shared/schemas/common'
import { ImportedRejectSchema } from '#shared/schemas/imported'
import { rejectImportedTier } from '../../../../services/tiers'

/** A qualified assessor rejects (deletes) an unconfirmed imported tier, with the reason; audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.grant')
  const { reason } = await validBody(event, ImportedRejectSchema)
  const { id } = validParams(event, IdParamSchema)
  return rejectImportedTier(actor, id, reason)
})
