/**
 * The vessel registry's codes in words for pages and labels: constructions, fibre classes, weaves and
 * the derived "retest due" beside the stored life-cycle states (whose words live in vessel-states.ts).
 */
import type { Words } from './words'
import type { VesselConstruction, Weave } from './vessel-arithmetic'
import { VESSEL_STATE_WORDS, type VesselFibreClass } from './vessel-states'
import type { EffectiveVesselState } from './vessel-transitions'

export const VESSEL_CONSTRUCTION_WORDS: Record<VesselConstruction, Words> = {
  single_bottle: { label: 'Single bottle', meaning: 'One carbonated-drink bottle, as bought.' },
  spliced_bottles: { label: 'Spliced bottles', meaning: 'Two or more bottles joined into one vessel.' },
  overwrapped_liner: { label: 'Overwrapped liner', meaning: 'A bottle or liner wrapped in a laminate of fibre and resin.' },
  mandrel_tube: { label: 'Mandrel-laid tube', meaning: 'A tube laid up on a mandrel, with its own end closures.' },
  other: { label: 'Other', meaning: 'Any other construction: describe it to the safety officer.' },
}

export const VESSEL_FIBRE_CLASS_LABELS: Record<VesselFibreClass, string> = {
  e_glass: 'E-glass',
  s_glass: 'S-glass',
  carbon: 'Carbon',
  aramid: 'Aramid',
  hybrid: 'Hybrid (more than one fibre)',
}

export const WEAVE_LABELS: Record<Weave, string> = {
  woven_0_90: 'Woven 0/90 cloth',
  hoop_tow: 'Hoop-wound tow',
}

/** A vessel's state as read (see vessel-transitions.ts): a stored state, or "retest due" (in service with its proof lapsed). */
export const VESSEL_EFFECTIVE_STATE_WORDS: Record<EffectiveVesselState, Words> = {
  ...VESSEL_STATE_WORDS,
  retest_due: { label: 'Retest due', meaning: 'Its proof has lapsed by time, fill count or an event: no fills until it passes a new proof test.' },
}
