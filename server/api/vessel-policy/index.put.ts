import { VesselPolicySchema } from '#shared/schemas/proof'
import { updateVesselPolicy } from '../../services/vessels'

/** The safety officer saves the club's whole vessel policy; validated, audited with before and after. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'policy.edit')
  const input = await validBody(event, VesselPolicySchema)
  return updateVesselPolicy(actor, input)
})
