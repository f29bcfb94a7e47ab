import { beforeAll, describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { clubDay, makeClub, makeFill, makeFillStation, makeLaunchEvent, makeMember, makeProofTest, makeVessel } from '../../support/factories'
import { parseCsv } from '../../support/csv'
import { sql } from '../../support/db'
import type { DeskCountsDto, DeskPageDto } from '../../../shared/types/audit-desk'

// The proofs table and the fills per event read running tallies the database keeps by trigger; this
// club puts a vessel on each way a proof lapses and checks the tallies against the rows themselves.

const ids: Record<string, string> = {}
let cookie = ''
let clubId = ''

beforeAll(async () => {
  const club = await makeClub()
  clubId = club.id
  const safety = await makeMember({ clubId, roles: ['instructor', 'safety_officer'] })
  const owner = await makeMember({ clubId, name: 'Pim Proofwatch' })
  const { stationId } = await makeFillStation({ clubId })
  const early = (await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(-20), stationIds: [stationId] })).eventId
  const late = (await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(-5), stationIds: [stationId] })).eventId
  const vessel = async (name: string, testedOn: string) => {
    const v = await makeVessel({ ownerId: owner.memberId, state: 'in_service', name })
    await makeProofTest({ vesselId: v.vesselId, witnessId: safety.memberId, testedOn })
    ids[name] = v.tag
    return v.vesselId
  }
  // Ten allowed fills (the bottle limit) since a proof 30 days ago, and one refused: lapsed by count.
  const counted = await vessel('Counted', clubDay(-30))
  for (let i = 0; i < 10; i++) await makeFill({ eventId: i % 2 ? early : late, stationId, memberId: owner.memberId, vesselId: counted })
  await makeFill({ eventId: late, stationId, memberId: owner.memberId, vesselId: counted, reasons: [{ code: 'TIER_CAP_EXCEEDED', message: 'Refused in a test' }] })
  // Nine fills, then a new pass after the first event: only the fills since the new pass count.
  const renewed = await vessel('Renewed', clubDay(-60))
  for (let i = 0; i < 9; i++) await makeFill({ eventId: i < 6 ? early : late, stationId, memberId: owner.memberId, vesselId: renewed })
  await makeProofTest({ vesselId: renewed, witnessId: safety.memberId, testedOn: clubDay(-10) })
  // Damaged after a recent proof: lapsed by the event.
  const damaged = await vessel('Damaged', clubDay(-15))
  await sql(`INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id) VALUES ($1, $2, 'damage', $3, 'Dropped on the pad', $4)`,
    [clubId, damaged, clubDay(-3), safety.memberId])
  // A quarantine after a recent proof ends nothing; a proof a year less 40 days ago lapses within 60 days.
  const held = await vessel('Held', clubDay(-15))
  await sql(`INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id) VALUES ($1, $2, 'quarantine', $3, 'Held briefly', $4)`,
    [clubId, held, clubDay(-3), safety.memberId])
  await vessel('Ageing', clubDay(-325))
  const res = await api('/api/auth/login', { body: { email: safety.email, password: safety.password } })
  cookie = sessionCookieOf(res)
})

describe('the desk\'s proofs from the tallies', () => {
  it('lists a vessel lapsed by fill count, by a proof-ending event and by time soon, and none current', async () => {
    const res = await api<DeskPageDto>('/api/audit/desk/proofs', { as: cookie, query: { sort: 'vessel', dir: 'asc' } })
    expect(res.status).toBe(200)
    const rows = Object.fromEntries(res.body.items.map(r => [r.cells.name, r.cells]))
    expect(Object.keys(rows).sort()).toEqual(['Ageing', 'Counted', 'Damaged'])
    expect(rows.Counted).toMatchObject({ state: 'Lapsed', fillsSinceProof: 10, fillsRemaining: 0 })
    expect(rows.Damaged).toMatchObject({ state: 'Lapsed', fillsSinceProof: 0 })
    expect(rows.Ageing).toMatchObject({ state: 'Lapsing', validThrough: expect.any(String) })
    expect(res.body.total).toBe(3)
    const counts = await api<DeskCountsDto>('/api/audit/desk', { as: cookie })
    const proofs = counts.body.counts.find(c => c.table === 'proofs')!
    expect(proofs).toMatchObject({ total: 3, within: { 30: 2, 60: 3, 90: 3 } })
    const csv = parseCsv((await api<string>('/api/audit/desk/proofs/export', { as: cookie, query: { state: 'lapsed' } })).body)
    expect(csv.slice(1).map(r => r[1]).sort()).toEqual(['Counted', 'Damaged'])
  })

  it('keeps the tallies equal to the proof tests and fills themselves', async () => {
    const drift = await sql(`
      SELECT v.id FROM vessels v
        LEFT JOIN vessel_proof_tallies t ON t.vessel_id = v.id
        LEFT JOIN LATERAL (SELECT max(p.tested_on) AS pass_on FROM proof_tests p WHERE p.vessel_id = v.id AND p.result = 'pass') lp ON true
       WHERE v.club_id = $1 AND (t.last_pass_on IS DISTINCT FROM lp.pass_on
          OR t.fills_since_pass IS DISTINCT FROM (SELECT CASE WHEN lp.pass_on IS NULL THEN NULL ELSE count(*)::int END FROM fills f
                                                   WHERE f.vessel_id = v.id AND f.allowed AND f.held_on >= lp.pass_on))`, [clubId])
    expect(drift).toEqual([])
    const events = await sql<{ fills: number, refused: number, supervised: number, f: number, r: number, s: number }>(`
      SELECT t.fills, t.refused, t.supervised, count(*) FILTER (WHERE f.allowed)::int AS f, count(*) FILTER (WHERE NOT f.allowed)::int AS r,
             count(*) FILTER (WHERE f.allowed AND f.supervisor_membership_id IS NOT NULL)::int AS s
        FROM launch_event_fill_tallies t JOIN fills f ON f.event_id = t.event_id WHERE t.club_id = $1 GROUP BY t.event_id`, [clubId])
    expect(events).toHaveLength(2)
    for (const e of events) expect([e.fills, e.refused, e.supervised]).toEqual([e.f, e.r, e.s])
    expect(events.reduce((n, e) => n + e.fills + e.refused, 0)).toBe(20)
  })
})
