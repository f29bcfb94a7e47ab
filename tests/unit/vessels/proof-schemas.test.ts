import { describe, expect, it } from 'vitest'
import { ProofTestSchema, VesselPolicySchema } from '../../../shared/schemas/proof'
import { DEFAULT_PROOF_POLICY } from '../../../shared/utils/vessel-arithmetic'

const policy = {
  marginRatio: 1.5, intervalMonths: { ...DEFAULT_PROOF_POLICY.intervalMonths }, fillLimit: { bottle: 10, laminate: 25 },
  cureWaitDays: 7, airTestsAllowed: false, distanceRule: 'tnt', kProcess: 0.5, equipmentFactor: 3,
}

describe('the proof-test form and route schema', () => {
  it('defaults to water, bar and a 120 s hold', () => {
    expect(ProofTestSchema.parse({ pressure: 12, result: 'pass' })).toMatchObject({ medium: 'water', unit: 'bar', holdS: 120 })
  })
  it.each([
    [{ pressure: 12, result: 'leak' }, 'failureLocation'],
    [{ pressure: 12, result: 'pass', failureLocation: 'wall' }, 'failureLocation'],
    [{ pressure: 0, result: 'pass' }, 'pressure'],
    [{ pressure: 12, result: 'pass', unit: 'atm' }, 'unit'],
  ])('refuses %j at %s', (body, field) => {
    const r = ProofTestSchema.safeParse(body)
    expect(r.success).toBe(false)
    expect(r.error!.issues.map(i => i.path[0])).toContain(field)
  })
})

describe('the vessel policy schema', () => {
  it('accepts the starting policy', () => {
    expect(VesselPolicySchema.safeParse(policy).success).toBe(true)
  })
  it.each([
    ['a margin below 1.25', { marginRatio: 1.2 }, 'marginRatio'],
    ['a margin with three decimals', { marginRatio: 1.255 }, 'marginRatio'],
    ['a zero process factor', { kProcess: 0 }, 'kProcess'],
    ['a process factor above 1', { kProcess: 1.2 }, 'kProcess'],
    ['a fractional cure wait', { cureWaitDays: 1.5 }, 'cureWaitDays'],
    ['an unknown distance rule', { distanceRule: '3tnt' }, 'distanceRule'],
    ['an equipment factor below 3', { equipmentFactor: 2.99 }, 'equipmentFactor'],
    ['an equipment factor with three decimals', { equipmentFactor: 3.125 }, 'equipmentFactor'],
  ])('refuses %s', (_label, change, field) => {
    const r = VesselPolicySchema.safeParse({ ...policy, ...change })
    expect(r.success).toBe(false)
    expect(r.error!.issues.map(i => i.path[0])).toContain(field)
  })
})
