import { IdParamSchema } from '#shared/schemas/common'
import { LaunchEventCancelSchema } from '#shared/schemas/events'
import { cancelLaunchEvent } from '../../../services/events'

/** A safety officer or admin cancels a launch event with a reason; every registered member is e-mailed. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  const { reason } = await validBody(event, LaunchEventCancelSchema)
  const { id } = validParams(event, IdParamSchema)
  return cancelLaunchEvent(actor, id, reason)
})
