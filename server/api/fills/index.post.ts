import { FillRequestSchema } from '#shared/schemas/fills'
import { recordFill } from '../../services/fills'

/**
 * Records a fill at the launch table: 201 with the fill when the gate allows it; 422 with every
 * reason (and the decision) when it refuses, the refused attempt logged.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const input = await validBody(event, FillRequestSchema)
  const fill = await recordFill(actor, input)
  setResponseStatus(event, 201)
  return fill
})
