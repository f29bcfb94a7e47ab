import { actorCan, type Actor } from '../../utils/auth'
import { loadStanding } from '../members'
import type { DashboardDto } from '#shared/types/dashboard'
import type { Card } from './provider'
import { DASHBOARD_PROVIDERS } from './providers'

/** The dashboard for the signed-in member: each provider's cards whose capability they hold, in the list's order. */
export async function loadDashboard(actor: Actor): Promise<DashboardDto | null> {
  const standing = await loadStanding(actor)
  if (!standing) return null
  const cards: Card[] = []
  for (const provider of DASHBOARD_PROVIDERS) {
    if (provider.capability && !actorCan(actor, provider.capability)) continue
    cards.push(...await provider.cards({ actor, standing }))
  }
  return { roles: actor.roles, cards }
}
