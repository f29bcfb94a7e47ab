import { actorCan, type Actor } from '../../utils/auth'
import { loadStanding } from '../members'
import type { DashboardDto } from '#shared/types/dashboard'
import { DASHBOARD_PROVIDERS } from './providers'

/** The dashboard for the signed-in member: each provider's cards whose capability they hold, in the list's order. */
export async function loadDashboard(actor: Actor): Promise<DashboardDto | null> {
  const standing = await loadStanding(actor)
  if (!standing) return null
  // The providers' queries are independent: run them side by side on the pool, keep the list's order.
  const groups = await Promise.all(DASHBOARD_PROVIDERS
    .filter(provider => !provider.capability || actorCan(actor, provider.capability))
    .map(provider => provider.cards({ actor, standing })))
  return { roles: actor.roles, cards: groups.flat() }
}
