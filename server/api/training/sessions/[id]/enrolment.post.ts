import { IdParamSchema } from '#shared/schemas/common'
import { enrol } from '../../../../services/training'

/** The signed-in member enrols: a place, or the end of the waiting list. 422 with the reason when their status may not train. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const place = await enrol(actor, id)
  setResponseStatus(event, 201)
  return place
})
