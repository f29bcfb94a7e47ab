import { IdParamSchema } from '#shared/schemas/common'
import { sessionDetail } from '../../../services/training'

/** One session with the caller's place; instructors also see its trainees and their assessment. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const session = await sessionDetail(actor, id)
  if (!session) notFound('No such session')
  return session
})
