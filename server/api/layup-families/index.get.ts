import type { LayupFamiliesDto } from '#shared/types/coupons'
import { listLayupFamilies } from '../../services/vessels'

/** The club's layup families with their coupons and calibration factors. Every member sees them. */
export default defineEventHandler(async (event): Promise<LayupFamiliesDto> => {
  const actor = await requireMember(event)
  return listLayupFamilies(actor.club.id)
})
