import { describe, expect, it } from 'vitest'
import { proofDue, vesselTransition, type EffectiveVesselState, type VesselAction } from '../../../shared/utils/vessel-transitions'

const pass: VesselAction = { kind: 'proof', result: 'pass' }
const leak: VesselAction = { kind: 'proof', result: 'leak' }
const burst: VesselAction = { kind: 'proof', result: 'burst' }
const deformed: VesselAction = { kind: 'proof', result: 'permanent_deformation' }
const report = (event: 'repair' | 'modification' | 'damage' | 'crash' | 'heat_exposure'): VesselAction => ({ kind: 'report', event })
const quarantine: VesselAction = { kind: 'quarantine' }
const release: VesselAction = { kind: 'release' }
const retire: VesselAction = { kind: 'retire' }

// The life-cycle table of the vessel brief, row by row, plus the safety officer's quarantine and release.
const ALLOWED: [EffectiveVesselState, VesselAction, string][] = [
  ['awaiting_proof', pass, 'in_service'],
  ['awaiting_proof', leak, 'awaiting_proof'],
  ['awaiting_proof', burst, 'failed'],
  ['awaiting_proof', deformed, 'failed'],
  ['retest_due', pass, 'in_service'],
  ['retest_due', leak, 'awaiting_proof'],
  ['retest_due', burst, 'failed'],
  ['retest_due', deformed, 'failed'],
  ['in_service', report('repair'), 'awaiting_proof'],
  ['in_service', report('modification'), 'awaiting_proof'],
  ['in_service', report('damage'), 'awaiting_proof'],
  ['in_service', report('crash'), 'awaiting_proof'],
  ['in_service', report('heat_exposure'), 'awaiting_proof'],
  ['retest_due', report('repair'), 'awaiting_proof'],
  ['retest_due', report('damage'), 'awaiting_proof'],
  ['retest_due', report('heat_exposure'), 'awaiting_proof'],
  ['awaiting_proof', report('repair'), 'awaiting_proof'], // the repair after a leak
  ['awaiting_proof', quarantine, 'quarantined'],
  ['in_service', quarantine, 'quarantined'],
  ['retest_due', quarantine, 'quarantined'],
  ['quarantined', release, 'awaiting_proof'],
  ['awaiting_proof', retire, 'retired'],
  ['in_service', retire, 'retired'],
  ['retest_due', retire, 'retired'],
  ['quarantined', retire, 'retired'],
]

const REFUSED: [EffectiveVesselState, VesselAction, string][] = [
  ['in_service', pass, 'PROOF_NOT_DUE'],
  ['in_service', leak, 'PROOF_NOT_DUE'],
  ['in_service', burst, 'PROOF_NOT_DUE'],
  ['quarantined', pass, 'VESSEL_QUARANTINED'],
  ['quarantined', burst, 'VESSEL_QUARANTINED'],
  ['quarantined', report('repair'), 'VESSEL_QUARANTINED'],
  ['quarantined', report('damage'), 'VESSEL_QUARANTINED'],
  ['quarantined', quarantine, 'ALREADY_QUARANTINED'],
  ['awaiting_proof', release, 'NOT_QUARANTINED'],
  ['in_service', release, 'NOT_QUARANTINED'],
  ['retest_due', release, 'NOT_QUARANTINED'],
  ...(['failed', 'retired'] as const).flatMap(from =>
    [pass, leak, burst, deformed, report('repair'), report('damage'), quarantine, release, retire]
      .map(action => [from, action, 'VESSEL_FINAL'] as [EffectiveVesselState, VesselAction, string])),
]

describe('vesselTransition: the vessel life-cycle table', () => {
  it.each(ALLOWED)('from %s, %j leads to %s', (from, action, to) => {
    expect(vesselTransition(from, action)).toEqual({ allowed: true, to })
  })

  it.each(REFUSED)('from %s, %j is refused with %s and a sentence', (from, action, code) => {
    const t = vesselTransition(from, action)
    expect(t.allowed).toBe(false)
    if (t.allowed) return
    expect(t.reason.code).toBe(code)
    expect(t.reason.message.length).toBeGreaterThan(20)
  })

  it.each([
    ['awaiting_proof', true], ['retest_due', true], ['in_service', false], ['quarantined', false], ['failed', false], ['retired', false],
  ] as const)('a proof test is due in %s: %s', (state, due) => {
    expect(proofDue(state)).toBe(due)
  })
})
