import { IdParamSchema } from '#shared/schemas/common'
import { withdraw } from '../../../../services/training'

/** The signed-in member withdraws; the first on the waiting list moves up and is told. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return withdraw(actor, id)
})
