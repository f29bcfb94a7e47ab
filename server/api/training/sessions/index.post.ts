import { SessionCreateSchema } from '#shared/schemas/training'
import { scheduleSession } from '../../../services/training'

/** An instructor schedules a session (course, start and end on the club's clock, place, capacity). 201 with it. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  const input = await validBody(event, SessionCreateSchema)
  const session = await scheduleSession(actor, input)
  setResponseStatus(event, 201)
  return session
})
