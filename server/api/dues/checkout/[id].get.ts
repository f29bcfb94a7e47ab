import { IdParamSchema } from '#shared/schemas/common'
import { checkoutState } from '../../../services/dues'

/** The state of one of the member's own card payments, which the return page polls until it is applied. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  return checkoutState(actor, id)
})
