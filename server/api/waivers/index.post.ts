import { WaiverPublishSchema } from '#shared/schemas/waiver'
import { publishWaiver } from '../../services/waivers'

/** Publish a new waiver version (policy.edit): everyone is asked to accept again. 201; 409 on a race. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'policy.edit')
  const input = await validBody(event, WaiverPublishSchema)
  const waiver = await publishWaiver(actor, input)
  setResponseStatus(event, 201)
  return waiver
})
