import {
  VesselArithmeticError, airCharge, minimumDistance, type AirCharge, type DistanceRule, type MinimumDistance,
} from '~~/shared/utils/vessel-arithmetic'
import { pressureFromPa, pressureToPa, type PressureEntryUnit } from '~~/shared/utils/units'

/** The calculator's inputs as typed (text, so that "2,5" and an empty field can be told apart from 0). */
export interface AirChargeFields {
  pressure: string
  unit: PressureEntryUnit
  vesselVolumeL: string
  waterVolumeL: string
  distanceRule: DistanceRule
}

/** What the calculator shows: the route's figures plus the pressures in bar and psi and the distance's two parts. */
export interface AirChargeFigures {
  charge: AirCharge
  distance: MinimumDistance
  gaugeBar: number
  gaugePsi: number
  absoluteBar: number
  absolutePsi: number
}

/** A typed number: a decimal comma is a point; empty is null (not 0). */
function typedNumber(text: string): number | null {
  const cleaned = text.trim().replace(',', '.')
  return cleaned === '' ? null : Number(cleaned)
}

/**
 * The air-charge figures of `fields`, computed in the browser with the same shared arithmetic the
 * server's `/api/calc/air-charge` uses, so they change as the member types with no round trip.
 */
export function useAirCharge(fields: Ref<AirChargeFields>) {
  return computed<{ figures: AirChargeFigures | null, error: string | null, errorField: string | null }>(() => {
    const f = fields.value
    const pressure = typedNumber(f.pressure)
    const vesselVolumeL = typedNumber(f.vesselVolumeL)
    if (pressure === null || vesselVolumeL === null) return { figures: null, error: null, errorField: null }
    try {
      const charge = airCharge({ gaugePressure: pressure, unit: f.unit, vesselVolumeL, waterVolumeL: typedNumber(f.waterVolumeL) ?? 0, distanceRule: f.distanceRule })
      const gaugePa = pressureToPa(pressure, f.unit)
      return {
        figures: {
          charge,
          distance: minimumDistance(charge.storedEnergyJ, f.distanceRule),
          gaugeBar: pressureFromPa(gaugePa, 'bar'),
          gaugePsi: pressureFromPa(gaugePa, 'psi'),
          absoluteBar: pressureFromPa(charge.absolutePressurePa, 'bar'),
          absolutePsi: pressureFromPa(charge.absolutePressurePa, 'psi'),
        },
        error: null,
        errorField: null,
      }
    }
    catch (error) {
      if (!(error instanceof VesselArithmeticError)) throw error
      return { figures: null, error: error.message, errorField: error.field }
    }
  })
}
