/**
 * The fill gate's refusal reasons: each a stable code (the API, the fill log and the tests use it) with
 * one plain sentence, defined here once. The gate lists every rule that fails, in this order.
 */
import type { Words } from './words'

export const FILL_REASON_CODES = [
  'MEMBERSHIP_NOT_ACTIVE',
  'WAIVER_NOT_ACCEPTED',
  'GUARDIAN_CONSENT_MISSING',
  'NO_VALID_TIER',
  'TIER_CAP_EXCEEDED',
  'COURSE_NOT_CURRENT',
  'VESSEL_NOT_IN_SERVICE',
  'PROOF_LAPSED',
  'RATED_FILL_EXCEEDED',
  'EVENT_CAP_EXCEEDED',
  'EQUIPMENT_RATING_EXCEEDED',
  'GAUGE_CALIBRATION_DUE',
  'METAL_IN_PRESSURE_PATH',
  'JUNIOR_UNSUPERVISED',
  'SUPERVISOR_NOT_QUALIFIED',
  'NOT_ON_EVENT_STAFF',
  'STATION_NOT_AT_EVENT',
  'EVENT_NOT_TODAY',
] as const
export type FillReasonCode = typeof FILL_REASON_CODES[number]

/** The sentence each refusal shows; the same words on the fill page, the fill log and the roster. */
export const FILL_REASON_MESSAGES: Record<FillReasonCode, string> = {
  MEMBERSHIP_NOT_ACTIVE: 'The membership is not active: dues must be paid through today, and the member not suspended or resigned.',
  WAIVER_NOT_ACCEPTED: 'The member has not accepted the club\'s current waiver.',
  GUARDIAN_CONSENT_MISSING: 'A junior (or a member with no birth date on record) needs a guardian\'s consent before any fill.',
  NO_VALID_TIER: 'The member holds no valid pressure tier that allows a fill.',
  TIER_CAP_EXCEEDED: 'The pressure is above what the member\'s tier allows.',
  COURSE_NOT_CURRENT: 'A course this fill needs is not current.',
  VESSEL_NOT_IN_SERVICE: 'The vessel is not in service (awaiting proof, quarantined, failed or retired): it may not be filled.',
  PROOF_LAPSED: 'The vessel\'s proof test has lapsed (by time, by fill count or by an event): it needs a new proof test.',
  RATED_FILL_EXCEEDED: 'The pressure is above the vessel\'s rated fill.',
  EVENT_CAP_EXCEEDED: 'The pressure is above the event\'s pressure cap.',
  EQUIPMENT_RATING_EXCEEDED: 'The pressure is above what the fill station may launch at (its lowest rated part divided by the club\'s equipment factor).',
  GAUGE_CALIBRATION_DUE: 'The fill station\'s gauge is past its calibration date.',
  METAL_IN_PRESSURE_PATH: 'At a competition event no metal part may be in the pressure path, and this vessel has one.',
  JUNIOR_UNSUPERVISED: 'Every fill of a junior (or of a member with no birth date on record) is a supervised fill recorded by an instructor.',
  SUPERVISOR_NOT_QUALIFIED: 'A supervised fill is recorded by an instructor on the event\'s staff, for another member, holding a valid tier at or above the tier the fill needs.',
  NOT_ON_EVENT_STAFF: 'Only the event\'s staff may check or record fills for other members there.',
  STATION_NOT_AT_EVENT: 'This fill station is not one the event uses.',
  EVENT_NOT_TODAY: 'Fills are recorded on the event\'s day; a check may look ahead to a later event, never back.',
}

/** One refusal as the API answers it. */
export interface FillReason { code: FillReasonCode, message: string }

/** The reason `code` with its sentence, and `detail` (such as the courses that lapsed) after it. */
export function fillReason(code: FillReasonCode, detail?: string): FillReason {
  const sentence = FILL_REASON_MESSAGES[code]
  return { code, message: detail ? `${sentence.replace(/\.$/, '')}: ${detail}.` : sentence }
}

/** What may set the permitted maximum; ties go to the earlier one in this list. */
export const LIMITING_FACTORS = ['TIER', 'VESSEL_RATING', 'EVENT_CAP', 'EQUIPMENT_RATING'] as const
export type LimitingFactor = typeof LIMITING_FACTORS[number]

export const LIMITING_FACTOR_WORDS: Record<LimitingFactor, Words> = {
  TIER: { label: 'Member\'s tier', meaning: 'The fill cap of the member\'s valid tier (or the supervised tier) sets the maximum.' },
  VESSEL_RATING: { label: 'Vessel\'s rated fill', meaning: 'The vessel\'s rated fill from its last passed proof test sets the maximum.' },
  EVENT_CAP: { label: 'Event cap', meaning: 'The launch event\'s pressure cap sets the maximum.' },
  EQUIPMENT_RATING: { label: 'Fill station rating', meaning: 'The station\'s lowest rated part divided by the club\'s equipment factor sets the maximum.' },
}
