import { VesselTagParamSchema } from '#shared/schemas/vessel'
import { vesselToReport } from '../../../services/incidents'

/** Any vessel of the club by its tag, for the report form (any signed-in member): its tag, name and state only; 404 if none. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { tag } = validParams(event, VesselTagParamSchema)
  const vessel = await vesselToReport(actor, tag)
  if (!vessel) notFound('No such vessel')
  return vessel
})
