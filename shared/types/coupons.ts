import type { CalibrationFactor, FibreClass, Weave } from '../utils/vessel-arithmetic'
import type { CouponFailureMode } from '../utils/coupon-failure-modes'

/** Coupon tests, layup families and burst estimates. Plain objects the routes return. */

/** A layup family: the four things that make it, with the key that names it in links and filters. */
export interface LayupFamilyWordsDto {
  key: string
  fibreClass: FibreClass
  arealWeightGPerM2: number
  weave: Weave
  /** The resin as first recorded in the family (families compare it trimmed and case-insensitively). */
  resin: string
}

export interface CouponTestDto {
  id: string
  familyKey: string
  testedOn: string
  testedBy: { id: string, name: string }
  fibreClass: FibreClass
  arealWeightGPerM2: number
  weave: Weave
  plies: number
  resin: string
  tubeDiameterMm: number
  fibreVolumeFraction: number
  burstPressureBar: number
  /** The estimate for this coupon's own layup and tube, bar: what the factor compares against. */
  estimatedBurstBar: number
  /** measured ÷ estimated. */
  ratio: number
  failureMode: CouponFailureMode
  notes: string | null
  photoId: string | null
  createdAt: string
}

export interface LayupFamilyDto extends LayupFamilyWordsDto {
  couponCount: number
  /** Median, count, min and max of measured ÷ estimated over the family's coupons. */
  factor: CalibrationFactor
  coupons: CouponTestDto[]
}

/** `GET /api/layup-families`: every family the club has coupons for, and the process factor behind the estimates. */
export interface LayupFamiliesDto {
  processFactor: number
  families: LayupFamilyDto[]
}

/** A vessel's burst estimate: none (with the reason) without a laminate or for a hybrid. */
export type BurstEstimateDto
  = | { estimate: null, reason: string }
    | {
      estimate: true
      /** From generic fibre properties, bar. */
      rawBar: number
      /** rawBar × the family's median factor, or null when no coupon of the family is recorded. */
      calibratedBar: number | null
      couponCount: number
      factor: CalibrationFactor | null
      /** The vessel's family (null when its resin is not named, so no family can match it). */
      family: LayupFamilyWordsDto | null
      processFactor: number
      fibreVolumeFraction: number
      note: string
    }
