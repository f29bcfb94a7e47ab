import type { Role } from '../utils/permissions'

/** The dashboard's cards. Plain objects the routes return, never model instances. */

export interface DashboardDto {
  roles: Role[]
  /** `group` sorts cards into sections on the dashboard: mine, members, office, safety, audit. */
  cards: { key: string, title: string, value: number | string, hint: string, to?: string, tone: 'ok' | 'attention' | 'neutral', group?: string }[]
}
