import { IdParamSchema } from '#shared/schemas/common'
import { LaunchEventSchema } from '#shared/schemas/events'
import { updateLaunchEvent } from '../../services/events'

/** A safety officer or admin changes a launch event; a new day e-mails every registered member. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  const input = await validBody(event, LaunchEventSchema)
  const { id } = validParams(event, IdParamSchema)
  return updateLaunchEvent(actor, id, input)
})
