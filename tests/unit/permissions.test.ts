import { describe, it, expect } from 'vitest'
import { CAPABILITIES, rolesCan, capabilitiesOf, normaliseRoles, ROLES, type Capability } from '../../shared/utils/permissions'

// The table in the design brief ("People and rights"), row by row: the code must match it exactly.
const BRIEF: Record<Capability, string[]> = {
  'members.read': ['instructor', 'safety_officer', 'admin'],
  'members.manage': ['admin'],
  'members.import': ['admin'],
  'roles.assign': ['admin'],
  'training.run': ['instructor'],
  'training.flag': ['instructor', 'safety_officer'],
  'tiers.grant': ['instructor', 'safety_officer'],
  'tiers.suspend': ['safety_officer'],
  'vessels.read_all': ['instructor', 'safety_officer'],
  'vessels.witness': ['instructor'],
  'vessels.quarantine': ['safety_officer'],
  'events.manage': ['safety_officer', 'admin'],
  'fills.record_any': ['instructor', 'safety_officer'],
  'stations.manage': ['safety_officer', 'admin'],
  'bookings.cancel_any': ['safety_officer', 'admin'],
  'policy.edit': ['safety_officer'],
  'dues.manage': ['admin'],
  'notices.manage': ['admin'],
  'audit.read': ['safety_officer', 'admin'],
  'evidence.export': ['safety_officer', 'admin'],
  'incidents.review': ['safety_officer'],
  'club.edit': ['admin'],
}

describe('the capability table', () => {
  it('has exactly the brief\'s capabilities', () => {
    expect(Object.keys(CAPABILITIES).sort()).toEqual(Object.keys(BRIEF).sort())
  })

  const cases = Object.entries(BRIEF).flatMap(([cap, roles]) =>
    ROLES.map(role => [cap as Capability, role, roles.includes(role)] as const))

  it.each(cases)('%s for a lone %s → %s', (cap, role, expected) => {
    expect(rolesCan([role], cap)).toBe(expected)
  })

  it('a plain member holds no capability: they act on their own records only', () => {
    expect(capabilitiesOf(['member'])).toEqual([])
  })

  it('combines roles: a safety officer who instructs can witness and quarantine', () => {
    const caps = capabilitiesOf(['member', 'instructor', 'safety_officer'])
    expect(caps).toContain('vessels.witness')
    expect(caps).toContain('vessels.quarantine')
    expect(caps).not.toContain('dues.manage')
  })

  it('ignores unknown roles and always keeps member', () => {
    expect(normaliseRoles(['admin', 'pilot', 'admin'])).toEqual(['member', 'admin'])
    expect(rolesCan(['superuser'], 'members.read')).toBe(false)
  })
})
