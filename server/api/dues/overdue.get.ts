import { graceAndLapsed } from '../../services/dues'

/** Who is in the grace period or lapsed (dues.manage). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'dues.manage')
  return { items: await graceAndLapsed(actor) }
})
