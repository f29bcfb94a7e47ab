import { FillSnapshotEventParamSchema, FillSnapshotRequestSchema } from '#shared/schemas/fill-snapshots'
import { issueSnapshot } from '../../../../services/fills'

/**
 * The event's signed snapshot for one device (201): the facts the fill page decides on without a
 * network, as of the event's day, and the fills it reserves for that device. The event's staff with
 * fills.record_any only (403); 404 no such event; 409 cancelled or over.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'fills.record_any')
  const { id } = validParams(event, FillSnapshotEventParamSchema)
  const { deviceId } = await validBody(event, FillSnapshotRequestSchema)
  const signed = await issueSnapshot(actor, id, deviceId)
  setResponseStatus(event, 201)
  return signed
})
