import { IdParamSchema } from '#shared/schemas/common'
import { RosterQuerySchema } from '#shared/schemas/training'
import { courseRoster } from '../../../../services/training'

/** Who is current in a course (members.read), by name, a page at a time. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.read')
  const { id } = validParams(event, IdParamSchema)
  const { page, pageSize } = validQuery(event, RosterQuerySchema)
  const roster = await courseRoster(actor.club.id, actor.club.timeZone, id, page, pageSize)
  if (!roster) notFound('No such course')
  return roster
})
