import { FillPassTokenParamSchema } from '#shared/schemas/fill-passes'
import { fillPassMember, refuseFillPass } from '../../../services/tiers'

/** The member behind a scanned fill pass of this club, for the staff at the launch table (fills.record_any). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'fills.record_any')
  const { token } = validParams(event, FillPassTokenParamSchema)
  const answer = await fillPassMember(actor, token)
  if (typeof answer === 'string') refuseFillPass(answer)
  return answer
})
