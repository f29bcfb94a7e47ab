import { FillRequestSchema } from '#shared/schemas/fills'
import { checkFill } from '../../services/fills'

/**
 * The fill gate's answer for one fill, before it happens (at the launch table, or a what-if before
 * the event's day): 200 with the permitted maximum, what limits it, every reason it is refused and
 * the air charge with its standoff, even when the answer is no. Writes nothing.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const input = await validBody(event, FillRequestSchema)
  return checkFill(actor, input)
})
