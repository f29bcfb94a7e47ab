import type { AirCharge } from '../utils/vessel-arithmetic'

/**
 * `GET /api/calc/air-charge`: the air volume (L), absolute pressure over the code's 101 000 Pa
 * atmosphere (Pa), stored energy (J), TNT equivalent (kg), minimum distance to people (m) and the
 * distance rule used. Stable: other sites may call it.
 */
export type AirChargeDto = AirCharge
