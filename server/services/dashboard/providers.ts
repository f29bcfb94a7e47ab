import type { CardProvider } from './provider'
import { approvalCards, memberStatusCards, myStandingCards } from '../members'
import { outboxCards } from '../notices'
import { waiverCards } from '../waivers'
import { auditCards } from '../audit'

/**
 * Every domain's dashboard cards, in the order they show. A new domain writes its provider in its
 * own folder (`<domain>/dashboard-cards.ts`) and adds it here.
 */
export const DASHBOARD_PROVIDERS: readonly CardProvider[] = [
  myStandingCards,
  memberStatusCards,
  approvalCards,
  outboxCards,
  waiverCards,
  auditCards,
]
