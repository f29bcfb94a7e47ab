// Workshop stations: their kinds in words, and the cautions their pages show.
import type { Words } from './words'
import { COMPOSITE_CAUTION } from './training-words'

export const STATION_KINDS = ['laminating_bench', 'cure_rack_slot', 'sanding_booth', 'test_rig'] as const
export type StationKind = typeof STATION_KINDS[number]

/** Each kind of station in words. */
export const STATION_KIND_WORDS: Record<StationKind, Words> = {
  laminating_bench: { label: 'Laminating bench', meaning: 'A bench for wet layups: cloth, resin and hardener.' },
  cure_rack_slot: { label: 'Cure rack slot', meaning: 'A place on the cure rack where a fresh layup cures undisturbed.' },
  sanding_booth: { label: 'Sanding booth', meaning: 'The booth with dust extraction for sanding and trimming cured composites.' },
  test_rig: { label: 'Test rig', meaning: 'The water-filled hydrostatic rig for proof tests, behind its barrier.' },
}

/** The longest cure hold a laminating booking may ask for: 7 days. */
export const MAX_CURE_HOLD_HOURS = 168

// Composite work: resin and hardener are skin sensitisers; gloves, eye protection and ventilation
// whenever they are open, and sanding dust needs extraction and a fitted respirator (see the
// decision record on the workshop calendar for the published sources). The resin caution is the
// training pages' own (one wording of one hazard).
export const SANDING_CAUTION = 'Sand cured composites only in the booth with the extraction running, wearing a respirator you have been fit-tested for, eye protection and gloves. Dust from glass and carbon fibre irritates skin, eyes and lungs.'
export const RIG_CAUTION = 'The rig proof-tests full of water, behind its barrier: nobody stands over a pressurised vessel.'

/** The cautions a station of kind `kind` shows on its page and booking form. */
export function stationCautions(kind: StationKind): string[] {
  switch (kind) {
    case 'laminating_bench':
    case 'cure_rack_slot': return [COMPOSITE_CAUTION]
    case 'sanding_booth': return [SANDING_CAUTION, COMPOSITE_CAUTION]
    case 'test_rig': return [RIG_CAUTION]
  }
}
