import { ElsewhereRecordSchema } from '#shared/schemas/training'
import { addRecordTakenElsewhere } from '../../../services/training'
import { clubToday } from '../../../services/clubs'

/** An instructor enters a course taken elsewhere, with its uploaded evidence; marked as such. 201 with the record. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  const input = await validBody(event, ElsewhereRecordSchema)
  const record = await addRecordTakenElsewhere(actor, input, clubToday(actor.club))
  setResponseStatus(event, 201)
  return record
})
