/**
 * A layup in words for pages: "E-glass 300 g/m² woven 0/90 · Laminating epoxy".
 */
import { FIBRE_PROPERTIES, type FibreClass, type Weave } from './vessel-arithmetic'

/** Each weave as the trade says it. */
export const WEAVE_WORDS: Record<Weave, string> = { woven_0_90: 'woven 0/90 cloth', hoop_tow: 'hoop-wound tow' }

/** Short names of the fibre classes a coupon may be. */
export const FIBRE_CLASS_WORDS: Record<FibreClass, string> = { e_glass: 'E-glass', s_glass: 'S-glass', carbon: 'Carbon', aramid: 'Aramid' }

/** A layup family in words. */
export function layupWords(l: { fibreClass: FibreClass, arealWeightGPerM2: number, weave: Weave, resin: string }): string {
  const fibre = FIBRE_CLASS_WORDS[l.fibreClass] ?? FIBRE_PROPERTIES[l.fibreClass]?.label ?? l.fibreClass
  return `${fibre} ${l.arealWeightGPerM2} g/m² ${WEAVE_WORDS[l.weave]} · ${l.resin}`
}
