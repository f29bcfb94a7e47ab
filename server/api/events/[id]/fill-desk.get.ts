import { FillDeskParamSchema } from '#shared/schemas/fill-passes'
import { fillDesk } from '../../../services/fills'

/**
 * The launch-side fill page's facts for one event: the event, its fill stations and (for its staff)
 * the members registered. Any member may open it to fill their own vessels; 404 for no such event.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, FillDeskParamSchema)
  return (await fillDesk(actor, id)) ?? notFound('No such launch event')
})
