import { IdParamSchema } from '#shared/schemas/common'
import { WalkInSchema } from '#shared/schemas/events'
import { addWalkIn } from '../../../services/events'

/** A member of the event's staff (fills.record_any) adds a walk-in on the event's day. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'fills.record_any')
  const { membershipId } = await validBody(event, WalkInSchema)
  const { id } = validParams(event, IdParamSchema)
  return addWalkIn(actor, id, membershipId)
})
