/**
 * How a burst coupon failed, with its words. A hoop rupture is the failure the burst estimate models;
 * an axial split or a failed end fitting says the coupon burst below what its hoop could hold, and a
 * leak before burst (resin cracking until the water weeps through) never reached the hoop's strength.
 */
import type { Words } from './words'

export const COUPON_FAILURE_MODES = ['hoop_rupture', 'axial_split', 'end_fitting', 'leak_before_burst', 'other'] as const
export type CouponFailureMode = typeof COUPON_FAILURE_MODES[number]

export const COUPON_FAILURE_MODE_WORDS: Record<CouponFailureMode, Words> = {
  hoop_rupture: { label: 'Hoop rupture', meaning: 'The laminate broke round the circumference: the failure the estimate models.' },
  axial_split: { label: 'Axial split', meaning: 'The tube split along its length, from the end loads rather than the hoop.' },
  end_fitting: { label: 'End fitting', meaning: 'A plug, bung or bond at the end let go before the laminate did.' },
  leak_before_burst: { label: 'Leak before burst', meaning: 'The resin cracked and water wept through before the fibres broke.' },
  other: { label: 'Other', meaning: 'Something else; the notes say what.' },
}
