import { FillPassRenewSchema } from '#shared/schemas/fill-passes'
import { renewFillPass } from '../../services/tiers'

/** Issues the member a new fill pass: the old one stops working at once (the page asks first). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  await validBody(event, FillPassRenewSchema)
  setResponseHeader(event, 'cache-control', 'no-store')
  return renewFillPass(actor)
})
