import { WaiverAcceptSchema } from '#shared/schemas/waiver'
import { acceptWaiver } from '../../services/waivers'

/**
 * Accept the waiver in force with my typed name. 422 WAIVER_OUTDATED / NAME_MISMATCH / NO_WAIVER;
 * accepting again is idempotent (200, `alreadyAccepted: true`, the first acceptance stands).
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const input = await validBody(event, WaiverAcceptSchema)
  return acceptWaiver(actor, input)
})
