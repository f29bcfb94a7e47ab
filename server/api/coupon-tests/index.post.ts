import { CouponTestSchema } from '#shared/schemas/coupon'
import { statusKeepsRights } from '#shared/utils/membership-status'
import { clubToday } from '../../services/clubs'
import { recordCouponTest } from '../../services/vessels'

/** A member records a coupon test they did or witnessed; the burst pressure is stored in bar. 201 with the coupon. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  if (!statusKeepsRights(actor.status)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'A suspended or resigned member cannot record coupon tests' })
  }
  const input = await validBody(event, CouponTestSchema)
  const coupon = await recordCouponTest({ clubId: actor.club.id, membershipId: actor.membership.id, name: actor.user.name, today: clubToday(actor.club) }, input)
  setResponseStatus(event, 201)
  return coupon
})
