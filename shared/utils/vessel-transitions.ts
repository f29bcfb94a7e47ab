/**
 * THE vessel life-cycle table: which action may move a vessel from which state, and to where. The
 * server refuses anything else with the reason given here; pages offer only what it allows.
 *
 * | from                        | action                                              | to             |
 * |-----------------------------|-----------------------------------------------------|----------------|
 * | awaiting proof, retest due  | proof passes                                        | in service     |
 * | awaiting proof, retest due  | proof leaks                                         | awaiting proof |
 * | awaiting proof, retest due  | proof bursts or deforms permanently                 | failed (final) |
 * | in service, retest due      | repair, modification, damage, crash, heat exposure  | awaiting proof |
 * | awaiting proof              | the same reports (the repair after a leak)          | awaiting proof |
 * | any but final               | the safety officer quarantines                      | quarantined    |
 * | quarantined                 | the safety officer releases after review            | awaiting proof |
 * | any but final               | owner or safety officer retires                     | retired        |
 *
 * "Retest due" is derived (an in-service vessel whose proof has lapsed by time or fill count): it is
 * never stored, so the table takes the effective state.
 */
import { FINAL_VESSEL_STATES, VESSEL_STATE_WORDS, type VesselState } from './vessel-states'
import type { Words } from './words'

/** A vessel's state as pages and rules see it: the stored state, or `retest_due` derived from it. */
export type EffectiveVesselState = VesselState | 'retest_due'

export const PROOF_RESULTS = ['pass', 'leak', 'permanent_deformation', 'burst'] as const
export type ProofResult = typeof PROOF_RESULTS[number]

export const PROOF_RESULT_WORDS: Record<ProofResult, Words> = {
  pass: { label: 'Pass', meaning: 'Held the test pressure for the hold time without a leak or a change of shape.' },
  leak: { label: 'Leak', meaning: 'Lost water or pressure: repair it, then test again.' },
  permanent_deformation: { label: 'Permanent deformation', meaning: 'Stayed bigger or bent after the pressure came off: never filled again.' },
  burst: { label: 'Burst', meaning: 'Broke under the test pressure: never filled again.' },
}

export const FAILURE_LOCATIONS = ['wall', 'splice', 'end_fitting', 'nozzle_bond'] as const
export type FailureLocation = typeof FAILURE_LOCATIONS[number]
export const FAILURE_LOCATION_LABELS: Record<FailureLocation, string> = {
  wall: 'Wall', splice: 'Splice', end_fitting: 'End fitting', nozzle_bond: 'Nozzle bond',
}

/** What an owner or an officer may report about a vessel: each ends its proof at once. */
export const REPORTABLE_VESSEL_EVENTS = ['repair', 'modification', 'damage', 'crash', 'heat_exposure'] as const
export type ReportableVesselEvent = typeof REPORTABLE_VESSEL_EVENTS[number]

/** Every kind of row in a vessel's event log, with its words (the incident issue reports `incident`). */
export const VESSEL_EVENT_KINDS = [...REPORTABLE_VESSEL_EVENTS, 'incident', 'quarantine', 'release', 'retire'] as const
export type VesselEventKind = typeof VESSEL_EVENT_KINDS[number]
export const VESSEL_EVENT_LABELS: Record<VesselEventKind, string> = {
  repair: 'Repair', modification: 'Modification', damage: 'Damage', crash: 'Crash', heat_exposure: 'Heat exposure',
  incident: 'Incident', quarantine: 'Quarantined', release: 'Released', retire: 'Retired',
}

export type VesselAction
  = | { kind: 'proof', result: ProofResult }
    | { kind: 'report', event: ReportableVesselEvent }
    | { kind: 'quarantine' }
    | { kind: 'release' }
    | { kind: 'retire' }

export interface TransitionRefusal { code: string, message: string }
export type Transition = { allowed: true, to: VesselState } | { allowed: false, reason: TransitionRefusal }

const PROOF_TO: Record<ProofResult, VesselState> = {
  pass: 'in_service', leak: 'awaiting_proof', permanent_deformation: 'failed', burst: 'failed',
}

const allow = (to: VesselState): Transition => ({ allowed: true, to })
const refuseWith = (code: string, message: string): Transition => ({ allowed: false, reason: { code, message } })

/** Whether no transition leaves `state` (failed, retired). */
export function isFinalVesselState(state: EffectiveVesselState): boolean {
  return (FINAL_VESSEL_STATES as readonly string[]).includes(state)
}

/**
 * Where `action` takes a vessel in effective state `from`, or why it may not: the table above and
 * nothing else. Who may act (owner, witness, safety officer) is the service's question, not this one.
 */
export function vesselTransition(from: EffectiveVesselState, action: VesselAction): Transition {
  if (isFinalVesselState(from)) {
    return refuseWith('VESSEL_FINAL', `The vessel is ${VESSEL_STATE_WORDS[from as VesselState].label.toLowerCase()}: nothing more may happen to it.`)
  }
  switch (action.kind) {
    case 'proof':
      if (from === 'awaiting_proof' || from === 'retest_due') return allow(PROOF_TO[action.result])
      if (from === 'quarantined') return refuseWith('VESSEL_QUARANTINED', 'The vessel is quarantined: the safety officer must release it before a proof test.')
      return refuseWith('PROOF_NOT_DUE', 'The vessel is in service and its proof stands: a new proof test is due only after a report or when the proof lapses.')
    case 'report':
      if (from === 'quarantined') return refuseWith('VESSEL_QUARANTINED', 'The vessel is quarantined: the safety officer reviews it and releases it first.')
      return allow('awaiting_proof')
    case 'quarantine':
      if (from === 'quarantined') return refuseWith('ALREADY_QUARANTINED', 'The vessel is already quarantined.')
      return allow('quarantined')
    case 'release':
      if (from !== 'quarantined') return refuseWith('NOT_QUARANTINED', 'Only a quarantined vessel can be released.')
      return allow('awaiting_proof')
    case 'retire':
      return allow('retired')
  }
}

/** Whether a proof test may be asked for or recorded in effective state `state`. */
export function proofDue(state: EffectiveVesselState): boolean {
  return vesselTransition(state, { kind: 'proof', result: 'pass' }).allowed
}
