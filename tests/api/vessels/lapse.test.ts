import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeProofTest, makeVessel } from '../../support/factories'
import type { Paged } from '../../../shared/types/common'
import type { VesselDto, VesselListItemDto } from '../../../shared/types/vessels'
import { act, proofClub, type ProofClub } from './proof-support'

let c: ProofClub

/** A vessel of the owner in service, passed `daysAgo` days ago at 15 bar (rated 10 bar). */
async function passed(daysAgo: number, construction: 'single_bottle' | 'spliced_bottles' = 'single_bottle', name?: string) {
  const { vesselId } = await makeVessel({ ownerId: c.owner.memberId, state: 'in_service', construction, name })
  await makeProofTest({ vesselId, witnessId: c.instructor.memberId, testedOn: clubDay(-daysAgo) })
  return vesselId
}

/** The date `months` calendar months after `date`, worked out here (month-end clamped). */
function plusMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const last = new Date(Date.UTC(y, m - 1 + months + 1, 0)).getUTCDate()
  return new Date(Date.UTC(y, m - 1 + months, Math.min(d, last))).toISOString().slice(0, 10)
}

beforeAll(async () => {
  c = await proofClub()
})

describe('a proof lapses by time', () => {
  it('a single bottle passed 400 days ago is retest due: no rated fill, the reason, and a proof may be recorded', async () => {
    const id = await passed(400)
    const v = (await api<VesselDto>(`/api/vessels/${id}`, { as: c.owner.cookie })).body
    expect(v).toMatchObject({ state: 'in_service', effectiveState: 'retest_due', ratedFillBar: null })
    expect(v.proof.validThroughOn).toBe(plusMonths(clubDay(-400), 12))
    expect(v.proof.lapseReasons.map(r => r.code)).toEqual(['PROOF_INTERVAL_PASSED'])
    expect((await act(c.owner, id, 'proof-requests')).status).toBe(200)
    const retest = await act(c.instructor, id, 'proof-tests', { pressure: 15, unit: 'bar', result: 'pass' })
    expect(retest.status).toBe(201)
    expect((await api<VesselDto>(`/api/vessels/${id}`, { as: c.owner.cookie })).body).toMatchObject({ effectiveState: 'in_service', ratedFillBar: 10 })
  })

  it('a spliced bottle lapses after 6 months, a single bottle of the same age does not', async () => {
    const spliced = await passed(200, 'spliced_bottles')
    const single = await passed(200)
    expect((await api<VesselDto>(`/api/vessels/${spliced}`, { as: c.owner.cookie })).body.effectiveState).toBe('retest_due')
    expect((await api<VesselDto>(`/api/vessels/${single}`, { as: c.owner.cookie })).body).toMatchObject({ effectiveState: 'in_service', ratedFillBar: 10 })
  })

  it('lapses at once on a damage report, even the day after the proof', async () => {
    const id = await passed(1)
    const res = await act(c.owner, id, 'events', { kind: 'damage', reason: 'Dropped on the slipway' })
    expect(res.body).toMatchObject({ effectiveState: 'awaiting_proof', ratedFillBar: null })
    expect(res.body.proof.lapseReasons[0].message).toMatch(/reported damage/)
  })
})

describe('"proof lapsing in 30 days"', () => {
  it('filters the officers\' table to in-service vessels whose proof runs out within 30 days or has run out', async () => {
    // Passed 350 days ago: current through 12 months after, about two weeks from now.
    const soon = await passed(350, 'single_bottle', 'Lapsing soon')
    const due = await passed(400, 'single_bottle', 'Retest due')
    const fresh = await passed(10, 'single_bottle', 'Fresh proof')
    const { vesselId: untested } = await makeVessel({ ownerId: c.owner.memberId, name: 'Never tested' })
    const res = await api<Paged<VesselListItemDto>>('/api/vessels', { as: c.safety.cookie, query: { lapsing: '1', pageSize: 100 } })
    expect(res.status).toBe(200)
    const ids = res.body.items.map(v => v.id)
    expect(ids).toEqual(expect.arrayContaining([soon, due]))
    expect(ids).not.toContain(fresh)
    expect(ids).not.toContain(untested)
    // Every vessel listed (this file's earlier ones too) is retest due or current for at most 30 more days.
    expect(res.body.items.filter(v => !(v.effectiveState === 'retest_due' || (v.validThroughOn && v.validThroughOn <= clubDay(30))))).toEqual([])
    const item = res.body.items.find(v => v.id === soon)!
    expect(item).toMatchObject({ effectiveState: 'in_service', ratedFillBar: 10, validThroughOn: plusMonths(clubDay(-350), 12) })
    expect(res.body.items.find(v => v.id === due)).toMatchObject({ effectiveState: 'retest_due', ratedFillBar: null })
    const all = await api<Paged<VesselListItemDto>>('/api/vessels', { as: c.safety.cookie, query: { pageSize: 100 } })
    expect(all.body.total).toBeGreaterThan(res.body.total)
    expect((await api('/api/vessels', { as: c.safety.cookie, query: { lapsing: 'maybe' } })).status).toBe(400)
  })

  it('the daily scan queues one notice to the owner per vessel and proof, however often it runs', async () => {
    const { memberId: ownerId } = c.owner
    const soon = await passed(340, 'single_bottle', 'Notice me')
    await passed(10, 'single_bottle', 'Not yet')
    const run = () => api('/api/outbox/run', { method: 'POST', as: c.admin.cookie, body: {} })
    expect((await run()).status).toBe(200)
    expect((await run()).status).toBe(200)
    const notices = await sql<{ kind: string, subject_key: string, due_on: string, subject: string }>(
      `SELECT kind, subject_key, due_on::text AS due_on, subject FROM notices WHERE membership_id = $1 AND kind = 'proof_lapsing' AND subject_key = $2`, [ownerId, soon])
    expect(notices).toHaveLength(1)
    expect(notices[0]).toMatchObject({ subject_key: soon, due_on: plusMonths(clubDay(-340), 12) })
    expect(notices[0]!.subject).toMatch(/Notice me/)
    // Every proof_lapsing notice of this owner is for a vessel lapsing within 30 days, never the fresh one.
    const all = await sql<{ due_on: string }>(`SELECT due_on::text AS due_on FROM notices WHERE membership_id = $1 AND kind = 'proof_lapsing'`, [ownerId])
    expect(all.every(n => n.due_on <= clubDay(30))).toBe(true)
  })
})
