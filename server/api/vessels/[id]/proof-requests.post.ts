import { IdParamSchema } from '#shared/schemas/common'
import { requestProofTest } from '../../../services/vessels'

/** The owner asks for a proof test of their vessel; instructors see it in their queue. Takes no body. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return requestProofTest(actor, id)
})
