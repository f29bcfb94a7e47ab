import { loadStanding } from '../../services/members'

/** My standing: the signed-in member's record, the club, today in its time zone and what needs attention. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return (await loadStanding(actor)) ?? notFound()
})
