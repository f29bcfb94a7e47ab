import { AirChargeQuerySchema } from '#shared/schemas/calc'
import type { AirChargeDto } from '#shared/types/calc'
import { airCharge } from '#shared/utils/vessel-arithmetic'
import { clubDistanceRule } from '../../services/vessels'

/**
 * The stored energy of an air charge, its TNT equivalent and the minimum distance to people (ASME
 * PCC-2's pneumatic-test method). Public: no sign-in. 400 with a message for input no vessel can have.
 */
export default defineEventHandler(async (event): Promise<AirChargeDto> => {
  const query = validQuery(event, AirChargeQuerySchema)
  // A signed-in member's club decides the default rule; the session is read if present, never required.
  const { user } = await getUserSession(event)
  const distanceRule = query.distanceRule ?? await clubDistanceRule(user?.clubId ?? null)
  return calculate(() => airCharge({
    gaugePressure: query.pressure,
    unit: query.unit,
    vesselVolumeL: query.vesselVolumeL,
    waterVolumeL: query.waterVolumeL,
    distanceRule,
  }))
})
