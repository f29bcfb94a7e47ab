import { IdParamSchema } from '#shared/schemas/common'
import { registerForEvent } from '../../../services/events'

/** The signed-in member registers for a launch event, until the day before it. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return registerForEvent(actor, id)
})
