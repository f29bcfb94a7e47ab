import { welcomesWaiting } from '../../services/accounts'
import type { WelcomeWaitingDto } from '#shared/types/imported'

/** How many imported members (no password, not welcomed yet) the admin's welcome would reach. */
export default defineEventHandler(async (event): Promise<WelcomeWaitingDto> => {
  const actor = await requirePermission(event, 'members.manage')
  return { waiting: await welcomesWaiting(actor) }
})
