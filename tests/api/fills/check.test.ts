import { describe, it, expect, beforeAll } from 'vitest'
import { sql } from '../../support/db'
import { fillBody, fillClub, filler, check, codesOf, type FillClub, type Filler } from './fill-support'

/** POST /api/fills/check: the gate's answer, 200 whether yes or no, writing nothing. */
describe('POST /api/fills/check', () => {
  let club: FillClub
  let member: Filler

  beforeAll(async () => {
    club = await fillClub()
    member = await filler(club)
  })

  it('allows a T2 member\'s own fill at 8 bar, limited by the tier (10 bar beats the 10 bar rating by the tie rule)', async () => {
    const res = await check(member.cookie, fillBody(club, member))
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.allowed).toBe(true)
    expect(res.body.reasons).toEqual([])
    expect(res.body.requested.pressureBar).toBe(8)
    expect(res.body.permittedMaxBar).toBe(10)
    expect(res.body.limitingFactor).toBe('TIER')
    expect(res.body.airCharge.storedEnergyJ).toBeGreaterThan(0)
    expect(res.body.airCharge.minimumDistanceM).toBeGreaterThan(0)
  })

  it('answers 200 with TIER_CAP_EXCEEDED at 12 bar, and writes nothing', async () => {
    const before = await sql<{ n: number }>('SELECT count(*)::int AS n FROM fills WHERE vessel_id = $1', [member.vesselId])
    const res = await check(member.cookie, fillBody(club, member, { pressure: 12 }))
    expect(res.status).toBe(200)
    expect(res.body.allowed).toBe(false)
    expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED'])
    const after = await sql<{ n: number }>('SELECT count(*)::int AS n FROM fills WHERE vessel_id = $1', [member.vesselId])
    expect(after[0]!.n).toBe(before[0]!.n)
  })
})
