import type { FillReason, LimitingFactor } from '../utils/fill-reasons'

/** The fill gate's answer (`POST /api/fills/check`; `POST /api/fills` adds the fill's id). */
export interface FillCheckDto {
  allowed: boolean
  requested: { pressureBar: number }
  /** The lowest of the four limits, at full precision (screens round it down to 0.1 bar). */
  permittedMaxBar: number
  limitingFactor: LimitingFactor
  reasons: FillReason[]
  airCharge: { storedEnergyJ: number, tntEquivalentKg: number, minimumDistanceM: number }
}

/** A recorded fill (allowed): the gate's answer and the row's id. */
export interface FillRecordedDto extends FillCheckDto {
  id: string
  recordedAt: string
}
