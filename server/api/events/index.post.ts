import { LaunchEventSchema } from '#shared/schemas/events'
import { createLaunchEvent } from '../../services/events'

/** A safety officer or admin (events.manage) creates a launch event. 201 with it. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  const input = await validBody(event, LaunchEventSchema)
  const created = await createLaunchEvent(actor, input)
  setResponseStatus(event, 201)
  return created
})
