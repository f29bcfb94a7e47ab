import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makePhoto, makeProofTest, makeVessel } from '../../support/factories'
import type { ProofRequestDto, ProofTestDto, VesselHistoryDto } from '../../../shared/types/proof-tests'
import type { VesselDto } from '../../../shared/types/vessels'
import { act, codes, proofClub, type ProofClub } from './proof-support'

let c: ProofClub
const water = (pressure: number, result = 'pass', extra: Record<string, unknown> = {}) => ({ pressure, unit: 'bar', result, ...extra })
const vessel = async (id: string, as: string) => (await api<VesselDto>(`/api/vessels/${id}`, { as })).body

beforeAll(async () => {
  c = await proofClub()
})

describe('asking for a proof test', () => {
  it('the owner asks; the instructors\' queue shows it; a plain member may not read the queue', async () => {
    const { vesselId, tag } = await makeVessel({ ownerId: c.owner.memberId })
    const asked = await act(c.owner, vesselId, 'proof-requests')
    expect(asked.status).toBe(200)
    expect(asked.body.proof.proofRequestedAt).toMatch(/^\d{4}-/)
    const queue = await api<ProofRequestDto[]>('/api/proof-requests', { as: c.instructor.cookie })
    expect(queue.status).toBe(200)
    expect(queue.body.find(r => r.vesselId === vesselId)).toMatchObject({ tag, owner: { id: c.owner.memberId }, effectiveState: 'awaiting_proof' })
    expect((await api('/api/proof-requests', { as: c.owner.cookie })).status).toBe(403)
    // Another member cannot ask for it: it is not theirs.
    expect((await act(c.other, vesselId, 'proof-requests')).status).toBe(404)
    // Recording the proof settles the request.
    expect((await act(c.instructor, vesselId, 'proof-tests', water(16))).status).toBe(201)
    expect((await vessel(vesselId, c.owner.cookie)).proof.proofRequestedAt).toBeNull()
    const after = await api<ProofRequestDto[]>('/api/proof-requests', { as: c.instructor.cookie })
    expect(after.body.map(r => r.vesselId)).not.toContain(vesselId)
  })

  it('refuses a request for a vessel in service whose proof stands', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, state: 'in_service' })
    await makeProofTest({ vesselId, witnessId: c.instructor.memberId, testedOn: clubDay(-5) })
    const res = await act(c.owner, vesselId, 'proof-requests')
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual(['PROOF_NOT_DUE'])
  })
})

describe('who may witness', () => {
  it('an instructor may not witness their own vessel: 422 WITNESS_IS_OWNER, nothing recorded', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.instructorOwner.memberId })
    const res = await act(c.instructorOwner, vesselId, 'proof-tests', water(16))
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual(['WITNESS_IS_OWNER'])
    expect(res.body.data.reasons[0].message).toMatch(/own vessel/)
    expect(await sql('SELECT id FROM proof_tests WHERE vessel_id = $1', [vesselId])).toEqual([])
    // Another instructor may.
    expect((await act(c.instructor, vesselId, 'proof-tests', water(16))).status).toBe(201)
  })

  it.each(['owner', 'other', 'safety', 'admin'] as const)('a %s without vessels.witness gets 403', async (who) => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const res = await act(c[who], vesselId, 'proof-tests', water(16))
    expect(res.status).toBe(403)
    expect((await vessel(vesselId, c.owner.cookie)).state).toBe('awaiting_proof')
  })

  it('answers 404 for a vessel of another club', async () => {
    const other = await proofClub()
    const { vesselId } = await makeVessel({ ownerId: other.owner.memberId })
    expect((await act(c.instructor, vesselId, 'proof-tests', water(16))).status).toBe(404)
  })
})

describe('the cure wait, the medium and the gauge photo', () => {
  it('refuses a proof before the cure wait after the last layup, naming the earliest date', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, construction: 'overwrapped_liner', lastLayupOn: clubDay(-3) })
    const res = await act(c.instructor, vesselId, 'proof-tests', water(20))
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual(['CURE_WAIT'])
    expect(res.body.data.reasons[0].message).toContain(clubDay(4))
    expect((await vessel(vesselId, c.owner.cookie)).proof.earliestProofOn).toBe(clubDay(4))
  })

  it('allows the proof on the first day after the cure wait', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, construction: 'mandrel_tube', lastLayupOn: clubDay(-7) })
    expect((await act(c.instructor, vesselId, 'proof-tests', water(20))).status).toBe(201)
  })

  it('refuses an air test when the club does not allow them', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const res = await act(c.instructor, vesselId, 'proof-tests', water(16, 'pass', { medium: 'air' }))
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual(['AIR_TESTS_NOT_ALLOWED'])
  })

  it('gives every reason at once', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.instructorOwner.memberId, construction: 'overwrapped_liner', lastLayupOn: clubDay(-1) })
    const res = await act(c.instructorOwner, vesselId, 'proof-tests', water(16, 'pass', { medium: 'air' }))
    expect(res.status).toBe(422)
    expect(codes(res.body).sort()).toEqual(['AIR_TESTS_NOT_ALLOWED', 'CURE_WAIT', 'WITNESS_IS_OWNER'])
  })

  it('takes a gauge photo of this vessel, and refuses another vessel\'s or a build photo', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const { vesselId: elsewhere } = await makeVessel({ ownerId: c.owner.memberId })
    const { photoId: foreign } = await makePhoto({ vesselId: elsewhere, uploadedBy: c.instructor.memberId, purpose: 'gauge' })
    const { photoId: build } = await makePhoto({ vesselId, uploadedBy: c.owner.memberId, purpose: 'build' })
    const { photoId: gauge } = await makePhoto({ vesselId, uploadedBy: c.instructor.memberId, purpose: 'gauge' })
    for (const photo of [foreign, build]) {
      const res = await act(c.instructor, vesselId, 'proof-tests', water(16, 'pass', { gaugePhotoId: photo }))
      expect(res.status).toBe(422)
      expect(codes(res.body)).toEqual(['GAUGE_PHOTO_NOT_FOUND'])
    }
    const ok = await act(c.instructor, vesselId, 'proof-tests', water(16, 'pass', { gaugePhotoId: gauge }))
    expect(ok.status).toBe(201)
    expect(ok.body.gaugePhotoId).toBe(gauge)
  })
})

describe('each result and the state it leads to', () => {
  it('a pass, entered in psi, is stored in bar and rates the vessel at proof ÷ 1.5, in service', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    // 232.07 psi = 16.0007 bar (NIST SP 811 B.8: 1 psi = 6 894.757 Pa) → 16.00 bar stored (rounded down);
    // rated fill 16 ÷ 1.5 = 10.666… → 10.66 bar (rounded down).
    const res = await act(c.instructor, vesselId, 'proof-tests', { pressure: 232.07, unit: 'psi', result: 'pass', holdS: 180, notes: 'Steady for 3 min' })
    expect(res.status).toBe(201)
    const test = res.body as ProofTestDto
    expect(test).toMatchObject({ pressureBar: 16, result: 'pass', medium: 'water', holdS: 180, marginRatio: 1.5, ratedFillBar: 10.66, failureLocation: null, witness: { id: c.instructor.memberId } })
    const v = await vessel(vesselId, c.owner.cookie)
    expect(v).toMatchObject({ state: 'in_service', effectiveState: 'in_service', ratedFillBar: 10.66 })
    expect(v.proof).toMatchObject({ lastProofOn: clubDay(0), ratedFillBar: 10.66, fillsSinceProof: 0, fillsRemaining: 10, lapseReasons: [] })
    const [audit] = await sql<{ action: string, before: unknown, after: { state: string, ratedFillBar: number } }>(
      `SELECT action, before, after FROM audit_events WHERE subject_id = $1 AND action = 'vessel.proof_test'`, [vesselId])
    expect(audit).toMatchObject({ before: { state: 'awaiting_proof' }, after: { state: 'in_service', result: 'pass', ratedFillBar: 10.66 } })
  })

  it.each([
    ['leak', 'awaiting_proof', 'nozzle_bond'],
    ['burst', 'failed', 'splice'],
    ['permanent_deformation', 'failed', 'end_fitting'],
  ])('%s leaves the vessel %s, with no rated fill and where it failed', async (result, state, location) => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, construction: 'spliced_bottles' })
    const res = await act(c.instructor, vesselId, 'proof-tests', water(14, result, { failureLocation: location }))
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ result, failureLocation: location, ratedFillBar: null, marginRatio: null })
    expect(await vessel(vesselId, c.owner.cookie)).toMatchObject({ state, ratedFillBar: null })
  })

  it('a leak, then a repair, then a pass puts the vessel in service', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    expect((await act(c.instructor, vesselId, 'proof-tests', water(14, 'leak', { failureLocation: 'end_fitting' }))).status).toBe(201)
    expect((await act(c.owner, vesselId, 'events', { kind: 'repair', reason: 'New end-fitting seal' })).status).toBe(200)
    expect((await act(c.instructor, vesselId, 'proof-tests', water(15))).status).toBe(201)
    expect((await vessel(vesselId, c.owner.cookie)).state).toBe('in_service')
  })

  it('refuses a result other than a pass without a failure location (400), and a proof once failed or while in service (422)', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const bad = await act(c.instructor, vesselId, 'proof-tests', water(14, 'burst'))
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toEqual(['failureLocation'])
    expect((await act(c.instructor, vesselId, 'proof-tests', water(14, 'burst', { failureLocation: 'wall' }))).status).toBe(201)
    const again = await act(c.instructor, vesselId, 'proof-tests', water(14))
    expect(again.status).toBe(422)
    expect(codes(again.body)).toEqual(['VESSEL_FINAL'])

    const { vesselId: serving } = await makeVessel({ ownerId: c.owner.memberId })
    expect((await act(c.instructor, serving, 'proof-tests', water(15))).status).toBe(201)
    const twice = await act(c.instructor, serving, 'proof-tests', water(15))
    expect(twice.status).toBe(422)
    expect(codes(twice.body)).toEqual(['PROOF_NOT_DUE'])
  })

  it('refuses a test date in the future and a pressure beyond any vessel', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const res = await act(c.instructor, vesselId, 'proof-tests', { pressure: 400, unit: 'MPa', result: 'pass', testedOn: clubDay(2) })
    expect(res.status).toBe(422)
    expect(codes(res.body).sort()).toEqual(['PRESSURE_OUT_OF_RANGE', 'TEST_DATE_IN_FUTURE'])
  })
})

describe('GET /api/vessels/:id/proof-tests: the history', () => {
  it('shows the owner and the officers the tests and events, newest first; another member gets 404', async () => {
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    await act(c.instructor, vesselId, 'proof-tests', water(14, 'leak', { failureLocation: 'wall' }))
    await act(c.owner, vesselId, 'events', { kind: 'repair', reason: 'Patched' })
    await act(c.instructor, vesselId, 'proof-tests', water(15))
    const mine = await api<VesselHistoryDto>(`/api/vessels/${vesselId}/proof-tests`, { as: c.owner.cookie })
    expect(mine.status).toBe(200)
    expect(mine.body.proofTests.map(t => t.result)).toEqual(['pass', 'leak'])
    expect(mine.body.events).toMatchObject([{ kind: 'repair', reason: 'Patched', by: { id: c.owner.memberId } }])
    expect((await api(`/api/vessels/${vesselId}/proof-tests`, { as: c.safety.cookie })).status).toBe(200)
    expect((await api(`/api/vessels/${vesselId}/proof-tests`, { as: c.other.cookie })).status).toBe(404)
  })
})
