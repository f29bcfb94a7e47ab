import { listStations } from '../../services/bookings'

/** The club's workshop stations, with their courses, opening hours and limits: every member. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return listStations(actor.club.id)
})
