import { IdParamSchema } from '#shared/schemas/common'
import { RetrainingFlagSchema } from '#shared/schemas/training'
import { flagRetraining } from '../../../../services/training'

/** An instructor or the safety officer (training.flag) flags a record "retraining required"; audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.flag')
  const input = await validBody(event, RetrainingFlagSchema)
  const { id } = validParams(event, IdParamSchema)
  return flagRetraining(actor, id, input)
})
