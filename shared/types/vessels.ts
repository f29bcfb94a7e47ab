import type { VesselConstruction, Weave } from '../utils/vessel-arithmetic'
import type { VesselFibreClass, VesselState } from '../utils/vessel-states'
import type { EffectiveVesselState } from '../utils/vessel-transitions'

/** Vessels in the club's registry. Plain objects the routes return, never model instances. */

export interface VesselListItemDto {
  id: string
  tag: string
  name: string
  construction: VesselConstruction
  state: VesselState
  volumeL: number
  diameterMm: number
  owner: { id: string, name: string }
  registeredAt: string
  /** The stored state, or `retest_due` when an in-service vessel's proof has lapsed. */
  effectiveState: EffectiveVesselState
  /** Rated fill (bar gauge) while the vessel is in service with its proof standing, else null. */
  ratedFillBar: number | null
  /** Last day the in-force proof is current by time (inclusive), or null. */
  validThroughOn: string | null
}

export interface VesselDto extends VesselListItemDto {
  lengthMm: number | null
  emptyMassG: number | null
  metalInPressurePath: boolean
  fibreClass: VesselFibreClass | null
  arealWeightGPerM2: number | null
  weave: Weave | null
  plies: number | null
  resin: string | null
  lastLayupOn: string | null
  updatedAt: string
  proof: VesselProofStandingDto
}

/**
 * Where a vessel stands with its proof, derived when read. `effectiveState` adds the derived
 * `retest_due` (in service, but the proof has lapsed by time, fill count or an event) to the stored state.
 */
export interface VesselProofStandingDto {
  effectiveState: EffectiveVesselState
  /** Rated fill (bar gauge) from the last passed proof, or null when the vessel has none in force. */
  ratedFillBar: number | null
  /** Date of the last passed proof test (YYYY-MM-DD), or null. */
  lastProofOn: string | null
  fillsSinceProof: number
  /** Fills still allowed before the proof lapses by count, or null without a proof. */
  fillsRemaining: number | null
  /** Last day the proof is current by time (inclusive), or null without a proof. */
  validThroughOn: string | null
  /** Why the proof has lapsed (empty while it stands). */
  lapseReasons: { code: string, message: string }[]
  /** The cure clock: first day a proof may be recorded after the last layup, or null without a layup. */
  earliestProofOn: string | null
  /** When the owner asked for a proof test that is not yet recorded, or null. */
  proofRequestedAt: string | null
}

/**
 * A vessel's printable label: what is written on it and the QR code (an SVG document) that opens the
 * vessel's page, `pageUrl`, on the club's public address.
 */
export interface VesselLabelDto {
  id: string
  tag: string
  name: string
  construction: VesselConstruction
  ownerName: string
  /** Rated fill (bar gauge) of the proof in force, or null. */
  ratedFillBar: number | null
  pageUrl: string
  qrSvg: string
}
