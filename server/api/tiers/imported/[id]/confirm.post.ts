import { IdParamSchema } from '#shared/schemas/common'
import { ImportedConfirmSchema } from '#shared/schemas/imported'
import { confirmImportedTier } from '../../../../services/tiers'

/** A qualified assessor confirms an imported tier: from now on it counts. 404, 409 confirmed already, 422 not qualified or own. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.grant')
  await validBody(event, ImportedConfirmSchema)
  const { id } = validParams(event, IdParamSchema)
  return confirmImportedTier(actor, id)
})
