import { describe, it, expect } from 'vitest'
import { sql } from '../../support/db'
import { makeTier, makeVessel } from '../../support/factories'
import { act, codes, person, proofClub } from '../vessels/proof-support'

describe('the proof-test witness tier rule', () => {
  it('a witness without a valid T3 or higher is refused (422 WITNESS_TIER_TOO_LOW); with T3 the test is recorded', async () => {
    const c = await proofClub()
    const witness = await person(c.clubId, ['instructor'])
    await makeTier({ memberId: witness.memberId, rank: 2 })
    await makeTier({ memberId: witness.memberId, rank: 3, suspended: true })
    const { vesselId } = await makeVessel({ ownerId: c.owner.memberId })
    const water = { pressure: 16, unit: 'bar', result: 'pass' }
    const refused = await act(witness, vesselId, 'proof-tests', water)
    expect(refused.status).toBe(422)
    expect(codes(refused.body)).toEqual(['WITNESS_TIER_TOO_LOW'])
    expect(refused.body.data.reasons[0].message).toMatch(/valid T3 or higher; yours is T2/)
    expect(await sql('SELECT id FROM proof_tests WHERE vessel_id = $1', [vesselId])).toEqual([])
    await makeTier({ memberId: (await person(c.clubId)).memberId, rank: 0 }) // unrelated tiers change nothing
    const t3 = await person(c.clubId, ['instructor'])
    await makeTier({ memberId: t3.memberId, rank: 3 })
    expect((await act(t3, vesselId, 'proof-tests', water)).status).toBe(201)
  })
})
