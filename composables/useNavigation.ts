import type { Capability } from '~~/shared/utils/permissions'

export interface NavItem { to: string, label: string, can?: Capability, testId: string }

/** The main navigation: every member sees the first group; the rest follow the capability table. */
export const NAV_ITEMS: NavItem[] = [
  { to: '/', label: 'Dashboard', testId: 'nav-dashboard' },
  { to: '/standing', label: 'My standing', testId: 'nav-standing' },
  { to: '/waiver', label: 'Waiver', testId: 'nav-waiver' },
  { to: '/vessels', label: 'Vessels', testId: 'nav-vessels' },
  { to: '/calculator', label: 'Calculator', testId: 'nav-calculator' },
  { to: '/coupons', label: 'Coupon bursts', testId: 'nav-coupons' },
  { to: '/training', label: 'Training', testId: 'nav-training' },
  { to: '/workshop', label: 'Workshop', testId: 'nav-workshop' },
  { to: '/tiers', label: 'Pressure tiers', testId: 'nav-tiers' },
  { to: '/events', label: 'Launch events', testId: 'nav-events' },
  { to: '/incidents', label: 'Incidents', testId: 'nav-incidents' },
  { to: '/members', label: 'Members', can: 'members.read', testId: 'nav-members' },
  { to: '/audit', label: 'Audit trail', can: 'audit.read', testId: 'nav-audit' },
  { to: '/audit/desk', label: 'Audit desk', can: 'audit.read', testId: 'nav-audit-desk' },
  { to: '/outbox', label: 'Outbox', can: 'notices.manage', testId: 'nav-outbox' },
  { to: '/dues/payments', label: 'Dues and payments', can: 'dues.manage', testId: 'nav-dues' },
  { to: '/vessel-policy', label: 'Vessel policy', can: 'policy.edit', testId: 'nav-vessel-policy' },
  { to: '/fill-stations', label: 'Fill stations', can: 'members.read', testId: 'nav-fill-stations' },
]

/** The navigation items the signed-in member may use. */
export function useNavigation() {
  const session = useSessionStore()
  return computed(() => NAV_ITEMS.filter(item => !item.can || session.can(item.can)))
}
