import { IdParamSchema } from '#shared/schemas/common'
import { ProofTestSchema } from '#shared/schemas/proof'
import { recordProofTest } from '../../../services/vessels'

/** An instructor who does not own the vessel records its proof test. 201 with the test; 422 with every reason. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'vessels.witness')
  const { id } = validParams(event, IdParamSchema)
  const input = await validBody(event, ProofTestSchema)
  const test = await recordProofTest(actor, id, input)
  setResponseStatus(event, 201)
  return test
})
