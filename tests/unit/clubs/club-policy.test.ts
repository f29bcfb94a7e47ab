import { describe, it, expect } from 'vitest'
import { ClubPolicySchema } from '../../../shared/schemas/club'

// The club's policy document (clubs.policy): read with defaults, refused when malformed.
describe('ClubPolicySchema', () => {
  it('fills in the junior tier cap (design brief default: T1)', () => {
    expect(ClubPolicySchema.parse({})).toEqual({ juniorTierCap: 'T1' })
  })

  it.each([['T0'], ['T1'], ['T2']])('accepts a junior cap of %s', (cap) => {
    expect(ClubPolicySchema.parse({ juniorTierCap: cap }).juniorTierCap).toBe(cap)
  })

  it.each([['T3'], ['T4'], [1], [null]])('refuses a junior cap of %s (juniors never hold laminate or senior tiers)', (cap) => {
    expect(ClubPolicySchema.safeParse({ juniorTierCap: cap }).success).toBe(false)
  })

  it('keeps settings later issues add', () => {
    expect(ClubPolicySchema.parse({ proofMargin: 1.5 })).toMatchObject({ proofMargin: 1.5, juniorTierCap: 'T1' })
  })
})
