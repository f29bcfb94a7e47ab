/**
 * The one capability table: which roles hold which capability. The server enforces it on every
 * route (server/utils/auth.ts → requirePermission); the browser only uses it to shape the interface.
 * "Officer" in the issues means the roles named here for the capability in question.
 */
export const ROLES = ['member', 'instructor', 'safety_officer', 'admin'] as const
export type Role = typeof ROLES[number]

export const ROLE_LABELS: Record<Role, string> = {
  member: 'Member',
  instructor: 'Instructor',
  safety_officer: 'Safety officer',
  admin: 'Admin',
}

export const CAPABILITIES = {
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
} as const satisfies Record<string, readonly Role[]>

export type Capability = keyof typeof CAPABILITIES

/** True when any of `roles` holds `capability` in the table above. */
export function rolesCan(roles: readonly string[], capability: Capability): boolean {
  const allowed: readonly string[] = CAPABILITIES[capability]
  return roles.some(role => allowed.includes(role))
}

/** Every capability held by `roles`, for the session and the navigation. */
export function capabilitiesOf(roles: readonly string[]): Capability[] {
  return (Object.keys(CAPABILITIES) as Capability[]).filter(c => rolesCan(roles, c))
}

/** Sorted, de-duplicated roles that always include `member` (every membership is a member). */
export function normaliseRoles(roles: readonly string[]): Role[] {
  const set = new Set<Role>(['member'])
  for (const r of roles) if ((ROLES as readonly string[]).includes(r)) set.add(r as Role)
  return ROLES.filter(r => set.has(r))
}
