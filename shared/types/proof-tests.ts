import type { DistanceRule, VesselConstruction } from '../utils/vessel-arithmetic'
import type { EffectiveVesselState, FailureLocation, ProofResult, VesselEventKind } from '../utils/vessel-transitions'

/** Proof tests, the vessel's event log, proof requests and the club's vessel policy, as routes return them. */

export interface ProofTestDto {
  id: string
  vesselId: string
  testedOn: string
  medium: 'water' | 'air'
  pressureBar: number
  holdS: number
  result: ProofResult
  failureLocation: FailureLocation | null
  notes: string | null
  gaugePhotoId: string | null
  /** The margin and rated fill a pass set (null for other results). */
  marginRatio: number | null
  ratedFillBar: number | null
  witness: { id: string, name: string }
  recordedAt: string
}

export interface VesselEventDto {
  id: string
  kind: VesselEventKind
  happenedOn: string
  reason: string
  newLayupOn: string | null
  by: { id: string, name: string }
  recordedAt: string
}

/** A vessel's proof history and event log, newest first. */
export interface VesselHistoryDto {
  proofTests: ProofTestDto[]
  events: VesselEventDto[]
}

/** A vessel whose owner asked for a proof test, for the instructors' queue. */
export interface ProofRequestDto {
  vesselId: string
  tag: string
  name: string
  construction: VesselConstruction
  effectiveState: EffectiveVesselState
  owner: { id: string, name: string }
  requestedAt: string
  /** The cure clock: the first day the proof may be recorded (null: no layup to wait for). */
  earliestProofOn: string | null
}

export interface VesselPolicyDto {
  marginRatio: number
  intervalMonths: Record<VesselConstruction, number>
  fillLimit: { bottle: number, laminate: number }
  cureWaitDays: number
  airTestsAllowed: boolean
  distanceRule: DistanceRule
  kProcess: number
  /** Fill stations launch at most at their lowest rated part ÷ this (never below 3). */
  equipmentFactor: number
}
