/**
 * A vessel's life-cycle states as stored, with their words. "Retest due" is not stored: an in-service
 * vessel falls due when its proof's interval or fill count is reached, which is derived when read.
 * The transitions between states belong to the proof and quarantine rules, not to this list.
 */
import type { Words } from './words'

export const VESSEL_STATES = ['awaiting_proof', 'in_service', 'quarantined', 'failed', 'retired'] as const
export type VesselState = typeof VESSEL_STATES[number]

/** Each state in words: the label pages and filters show and the sentence that explains it. */
export const VESSEL_STATE_WORDS: Record<VesselState, Words> = {
  awaiting_proof: { label: 'Awaiting proof', meaning: 'Registered, repaired or released: needs a witnessed proof test before any fill.' },
  in_service: { label: 'In service', meaning: 'Passed its proof: may be filled up to its rated fill until the proof lapses.' },
  quarantined: { label: 'Quarantined', meaning: 'Held after an incident or by the safety officer: no fills until released.' },
  failed: { label: 'Failed', meaning: 'Burst or deformed permanently at a proof test: never filled again.' },
  retired: { label: 'Retired', meaning: 'Taken out of use by its owner or the safety officer: never filled again.' },
}

/** States no transition leaves. */
export const FINAL_VESSEL_STATES: readonly VesselState[] = ['failed', 'retired']

/** Fibre classes a vessel's laminate may name: the arithmetic's classes, plus a hybrid of several. */
export const VESSEL_FIBRE_CLASSES = ['e_glass', 's_glass', 'carbon', 'aramid', 'hybrid'] as const
export type VesselFibreClass = typeof VESSEL_FIBRE_CLASSES[number]

/** Constructions laid up from cloth or tow: they must describe their laminate. */
export const LAMINATED_CONSTRUCTIONS = ['overwrapped_liner', 'mandrel_tube'] as const

/** A club's vessel tag: its prefix and the club's running number, at least four digits (SRG-0042). */
export function vesselTag(tagPrefix: string, number: number): string {
  return `${tagPrefix}-${String(number).padStart(4, '0')}`
}
