import { IdParamSchema } from '#shared/schemas/common'
import { withdrawFromEvent } from '../../../services/events'

/** The signed-in member withdraws from a launch event, until the day before it. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return withdrawFromEvent(actor, id)
})
