import { staffChoices } from '../../services/events'

/** The club's instructors and safety officers, to choose an event's staff from (events.manage). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'events.manage')
  return { items: await staffChoices(actor.club.id) }
})
