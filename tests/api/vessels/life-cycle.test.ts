import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeProofTest, makeVessel } from '../../support/factories'
import type { VesselDto } from '../../../shared/types/vessels'
import { act, codes, proofClub, type ProofClub } from './proof-support'

let c: ProofClub
const vessel = async (id: string) => (await api<VesselDto>(`/api/vessels/${id}`, { as: c.safety.cookie })).body

/** An in-service vessel of the owner with a pass ten days ago. */
async function inService() {
  const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, state: 'in_service' })
  await makeProofTest({ vesselId, witnessId: c.instructor.memberId, testedOn: clubDay(-10), pressureBar: 18 })
  return vesselId
}

beforeAll(async () => {
  c = await proofClub()
})

describe('reports that end a proof at once', () => {
  it.each(['repair', 'modification', 'damage', 'crash', 'heat_exposure'])('the owner reports %s: the vessel awaits proof, the proof lapsed', async (kind) => {
    const id = await inService()
    expect((await vessel(id)).ratedFillBar).toBe(12)
    const res = await act(c.owner, id, 'events', { kind, reason: `Reported ${kind}` })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ state: 'awaiting_proof', effectiveState: 'awaiting_proof', ratedFillBar: null })
    expect(res.body.proof.lapseReasons.map((r: { code: string }) => r.code)).toEqual(['PROOF_INVALIDATED'])
    const [audit] = await sql(`SELECT action, reason, after FROM audit_events WHERE subject_id = $1`, [id])
    expect(audit).toMatchObject({ action: 'vessel.report', reason: `Reported ${kind}`, after: { state: 'awaiting_proof', kind } })
  })

  it('an officer with vessels.read_all may report; another member gets 404', async () => {
    const id = await inService()
    expect((await act(c.other, id, 'events', { kind: 'damage', reason: 'Saw it dropped' })).status).toBe(404)
    expect((await vessel(id)).state).toBe('in_service')
    expect((await act(c.instructor, id, 'events', { kind: 'damage', reason: 'Saw it dropped' })).status).toBe(200)
  })

  it('a repair with a new layup date restarts the cure clock; a bottle has no layup to give', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, construction: 'overwrapped_liner', lastLayupOn: clubDay(-60), state: 'in_service' })
    await makeProofTest({ vesselId, witnessId: c.instructor.memberId, testedOn: clubDay(-40) })
    const res = await act(c.owner, vesselId, 'events', { kind: 'repair', reason: 'Extra ply over the scuff', newLayupOn: clubDay(-1) })
    expect(res.status).toBe(200)
    expect(res.body.lastLayupOn).toBe(clubDay(-1))
    expect(res.body.proof.earliestProofOn).toBe(clubDay(6))
    const bottle = await inService()
    const refused = await act(c.owner, bottle, 'events', { kind: 'repair', reason: 'Glued', newLayupOn: clubDay(-1) })
    expect(refused.status).toBe(422)
    expect(codes(refused.body)).toEqual(['NO_LAMINATE'])
  })

  it('refuses a report without a reason (400) and one dated in the future (422)', async () => {
    const id = await inService()
    const bad = await act(c.owner, id, 'events', { kind: 'damage' })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toEqual(['reason'])
    const future = await act(c.owner, id, 'events', { kind: 'damage', reason: 'Later', happenedOn: clubDay(3) })
    expect(future.status).toBe(422)
    expect(codes(future.body)).toEqual(['EVENT_DATE_IN_FUTURE'])
    expect((await vessel(id)).state).toBe('in_service')
  })
})

describe('quarantine and release', () => {
  it('the safety officer quarantines with a reason, and releases to awaiting proof', async () => {
    const id = await inService()
    const q = await act(c.safety, id, 'quarantine', { reason: 'Hard landing: review' })
    expect(q.status).toBe(200)
    expect(q.body).toMatchObject({ state: 'quarantined', ratedFillBar: null })
    const [audit] = await sql(`SELECT before, after, reason FROM audit_events WHERE subject_id = $1 AND action = 'vessel.quarantine'`, [id])
    expect(audit).toMatchObject({ before: { state: 'in_service' }, after: { state: 'quarantined' }, reason: 'Hard landing: review' })
    const r = await act(c.safety, id, 'release', { reason: 'Inspected: no damage found' })
    expect(r.status).toBe(200)
    expect(r.body.state).toBe('awaiting_proof')
  })

  it.each(['owner', 'instructor', 'admin'] as const)('a %s may not quarantine or release (403)', async (who) => {
    const id = await inService()
    expect((await act(c[who], id, 'quarantine', { reason: 'x' })).status).toBe(403)
    expect((await act(c[who], id, 'release', { reason: 'x' })).status).toBe(403)
  })

  it('requires a reason', async () => {
    const id = await inService()
    const res = await act(c.safety, id, 'quarantine', { reason: '   ' })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields)).toEqual(['reason'])
  })
})

describe('retirement', () => {
  it('the owner retires their vessel; an instructor may not (403); another member gets 404', async () => {
    const id = await inService()
    expect((await act(c.instructor, id, 'retire', { reason: 'Mine now?' })).status).toBe(403)
    expect((await act(c.other, id, 'retire', { reason: 'Mine now?' })).status).toBe(404)
    const res = await act(c.owner, id, 'retire', { reason: 'Creased' })
    expect(res.status).toBe(200)
    expect(res.body.state).toBe('retired')
  })

  it('the safety officer retires any member\'s vessel', async () => {
    const id = await inService()
    expect((await act(c.safety, id, 'retire', { reason: 'Unfit' })).body.state).toBe('retired')
  })
})

describe('every refused transition answers 422 with its reason', () => {
  /** A vessel of the owner in `state` (in service with a standing proof). */
  async function inState(state: 'awaiting_proof' | 'in_service' | 'quarantined' | 'failed' | 'retired') {
    if (state === 'in_service') return inService()
    return (await makeVessel({ ownerId: c.owner.memberId, state })).vesselId
  }
  const proof = { pressure: 15, unit: 'bar', result: 'pass' }
  const report = { kind: 'damage', reason: 'Dropped' }
  const why = { reason: 'Because' }

  it.each([
    ['in_service', 'instructor', 'proof-tests', proof, 'PROOF_NOT_DUE'],
    ['quarantined', 'instructor', 'proof-tests', proof, 'VESSEL_QUARANTINED'],
    ['quarantined', 'owner', 'events', report, 'VESSEL_QUARANTINED'],
    ['quarantined', 'safety', 'quarantine', why, 'ALREADY_QUARANTINED'],
    ['awaiting_proof', 'safety', 'release', why, 'NOT_QUARANTINED'],
    ['in_service', 'safety', 'release', why, 'NOT_QUARANTINED'],
    ['failed', 'instructor', 'proof-tests', proof, 'VESSEL_FINAL'],
    ['failed', 'owner', 'events', report, 'VESSEL_FINAL'],
    ['failed', 'safety', 'quarantine', why, 'VESSEL_FINAL'],
    ['failed', 'owner', 'retire', why, 'VESSEL_FINAL'],
    ['retired', 'instructor', 'proof-tests', proof, 'VESSEL_FINAL'],
    ['retired', 'owner', 'events', report, 'VESSEL_FINAL'],
    ['retired', 'safety', 'quarantine', why, 'VESSEL_FINAL'],
    ['retired', 'safety', 'release', why, 'VESSEL_FINAL'],
    ['retired', 'owner', 'retire', why, 'VESSEL_FINAL'],
    ['failed', 'owner', 'proof-requests', undefined, 'VESSEL_FINAL'],
    ['quarantined', 'owner', 'proof-requests', undefined, 'VESSEL_QUARANTINED'],
  ] as const)('from %s, %s → %s: %s', async (state, who, what, body, code) => {
    const id = await inState(state)
    const res = await act(c[who], id, what, body)
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual([code])
    expect((await vessel(id)).state).toBe(state)
  })
})
