import { myFillPass } from '../../services/tiers'

/** The member's fill pass: its verify address, expiry and QR code (issued now when none is live). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  setResponseHeader(event, 'cache-control', 'no-store')
  return myFillPass(actor)
})
