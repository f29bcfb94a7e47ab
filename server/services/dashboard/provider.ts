import type { Actor } from '../../utils/auth'
import type { Capability } from '#shared/utils/permissions'
import type { DashboardDto } from '#shared/types/dashboard'
import type { StandingDto } from '#shared/types/members'

/** One card of the dashboard. */
export type Card = DashboardDto['cards'][number]

/** What every provider is given: the actor and their standing (which also holds the club's today). */
export interface DashboardContext {
  actor: Actor
  standing: StandingDto
}

/**
 * A domain's cards. A provider lives in its domain's folder and is listed once in
 * dashboard/providers.ts; its cards show only to members holding `capability` (every member without one).
 */
export interface CardProvider {
  capability?: Capability
  cards: (context: DashboardContext) => Promise<Card[]> | Card[]
}
