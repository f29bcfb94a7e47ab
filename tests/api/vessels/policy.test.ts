import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeVessel } from '../../support/factories'
import type { VesselPolicyDto } from '../../../shared/types/proof-tests'
import { act, codes, proofClub, type ProofClub } from './proof-support'

let c: ProofClub
const STARTING: VesselPolicyDto = {
  marginRatio: 1.5,
  intervalMonths: { single_bottle: 12, spliced_bottles: 6, overwrapped_liner: 12, mandrel_tube: 12, other: 12 },
  fillLimit: { bottle: 10, laminate: 25 },
  cureWaitDays: 7,
  airTestsAllowed: false,
  distanceRule: 'tnt',
  kProcess: 0.5,
  equipmentFactor: 3,
}

beforeAll(async () => {
  c = await proofClub()
})

describe('the club\'s vessel policy', () => {
  it('every member reads the starting policy; only the safety officer may change it', async () => {
    const res = await api<VesselPolicyDto>('/api/vessel-policy', { as: c.owner.cookie })
    expect(res.status).toBe(200)
    expect(res.body).toEqual(STARTING)
    for (const who of ['owner', 'instructor', 'admin'] as const) {
      expect((await api('/api/vessel-policy', { method: 'PUT', as: c[who].cookie, body: STARTING })).status).toBe(403)
    }
  })

  it.each([
    ['a margin below 1.25', { marginRatio: 1.2 }, 'marginRatio'],
    ['a margin given as text', { marginRatio: '1.5' }, 'marginRatio'],
    ['a zero interval', { intervalMonths: { ...STARTING.intervalMonths, spliced_bottles: 0 } }, 'intervalMonths'],
    ['a negative fill limit', { fillLimit: { bottle: -1, laminate: 25 } }, 'fillLimit'],
    ['a cure wait of 100 days', { cureWaitDays: 100 }, 'cureWaitDays'],
    ['a process factor above 1', { kProcess: 1.5 }, 'kProcess'],
    ['an unknown distance rule', { distanceRule: '3tnt' }, 'distanceRule'],
    ['an equipment factor below 3', { equipmentFactor: 2.9 }, 'equipmentFactor'],
    ['no equipment factor', { equipmentFactor: undefined }, 'equipmentFactor'],
  ])('refuses %s with 400, changing and auditing nothing', async (_label, change, field) => {
    const before = await sql(`SELECT count(*)::int AS n FROM audit_events WHERE club_id = $1 AND action = 'policy.vessels'`, [c.clubId])
    const res = await api('/api/vessel-policy', { method: 'PUT', as: c.safety.cookie, body: { ...STARTING, ...change } })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields).some(k => k === field || k.startsWith(`${field}.`))).toBe(true)
    expect(await sql(`SELECT count(*)::int AS n FROM audit_events WHERE club_id = $1 AND action = 'policy.vessels'`, [c.clubId])).toEqual(before)
  })

  it('the database refuses a margin below 1.25 whatever the code says', async () => {
    await expect(sql(`INSERT INTO vessel_policies (club_id, margin_ratio) VALUES ($1, 1.2)
      ON CONFLICT (club_id) DO UPDATE SET margin_ratio = 1.2`, [c.clubId])).rejects.toThrow(/check/i)
  })

  it('the database refuses an equipment factor below 3 whatever the code says', async () => {
    await expect(sql(`INSERT INTO vessel_policies (club_id, equipment_factor) VALUES ($1, 2.5)
      ON CONFLICT (club_id) DO UPDATE SET equipment_factor = 2.5`, [c.clubId])).rejects.toThrow(/check/i)
  })

  it('saves a change, audits it with before and after, and the rules follow it', async () => {
    const changed: VesselPolicyDto = { ...STARTING, marginRatio: 2, cureWaitDays: 14, airTestsAllowed: true, distanceRule: '2tnt', kProcess: 0.45, equipmentFactor: 4 }
    const res = await api<VesselPolicyDto>('/api/vessel-policy', { method: 'PUT', as: c.safety.cookie, body: changed })
    expect(res.status).toBe(200)
    expect(res.body).toEqual(changed)
    expect((await api('/api/vessel-policy', { as: c.owner.cookie })).body).toEqual(changed)
    const [audit] = await sql<{ actor_membership_id: string, before: unknown, after: unknown }>(
      `SELECT actor_membership_id, before, after FROM audit_events WHERE club_id = $1 AND action = 'policy.vessels' ORDER BY created_at DESC LIMIT 1`, [c.clubId])
    expect(audit).toEqual({ actor_membership_id: c.safety.memberId, before: STARTING, after: changed })

    // The margin rates the next pass: 20 bar ÷ 2 = 10 bar; air tests are now allowed.
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const pass = await act(c.instructor, vesselId, 'proof-tests', { pressure: 20, unit: 'bar', result: 'pass', medium: 'air' })
    expect(pass.status).toBe(201)
    expect(pass.body).toMatchObject({ ratedFillBar: 10, marginRatio: 2, medium: 'air' })
    // The cure wait is now 14 days.
    const { vesselId: fresh } = await makeVessel({ ownerId: c.owner.memberId, construction: 'mandrel_tube', lastLayupOn: clubDay(-10) })
    const early = await act(c.instructor, fresh, 'proof-tests', { pressure: 20, unit: 'bar', result: 'pass' })
    expect(codes(early.body)).toEqual(['CURE_WAIT'])
    expect(early.body.data.reasons[0].message).toContain(clubDay(4))
    // The signed-in member's calculator takes the club's distance rule.
    const calc = await api('/api/calc/air-charge', { as: c.owner.cookie, query: { pressure: '6', unit: 'bar', vesselVolumeL: '2', waterVolumeL: '0.5' } })
    expect(calc.body.distanceRule).toBe('2tnt')
  })
})
