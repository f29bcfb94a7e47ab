import { IdParamSchema } from '#shared/schemas/common'
import { eventRoster } from '../../../services/events'

/** The launch-day roster of an event: staff and officers (members.read: it shows members' standing). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { id } = validParams(event, IdParamSchema)
  return eventRoster(actor, id)
})
