import { IdParamSchema } from '#shared/schemas/common'
import { AttendanceSchema } from '#shared/schemas/training'
import { recordAttendance, sessionDetail } from '../../../../services/training'

/** The instructor records who attended, theory scores and practical sign-offs; returns the session. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  const input = await validBody(event, AttendanceSchema)
  const { id } = validParams(event, IdParamSchema)
  await recordAttendance(actor, id, input)
  return sessionDetail(actor, id)
})
