import { CouponListQuerySchema } from '#shared/schemas/coupon'
import { listCouponTests } from '../../services/vessels'

/** The club's coupon tests, newest first, server-paged; `family` narrows to one layup family. Every member sees them. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const query = validQuery(event, CouponListQuerySchema)
  return listCouponTests(actor.club.id, query)
})
