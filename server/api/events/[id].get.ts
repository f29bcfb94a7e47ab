import { IdParamSchema } from '#shared/schemas/common'
import { launchEventDetail } from '../../services/events'

/** One launch event with its stations and staff, and what the caller may do there: every member. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return (await launchEventDetail(actor, id)) ?? notFound('No such event')
})
