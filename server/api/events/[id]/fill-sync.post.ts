import { FillSnapshotEventParamSchema, FillSyncRequestSchema } from '#shared/schemas/fill-snapshots'
import { syncOfflineFills } from '../../../services/fills'

/**
 * A device's queue of fills and refusals recorded offline at the event: 200 with one result per item,
 * in order — `recorded` (201), `duplicate` (200), `flagged` (201, with the server's reasons) or
 * `conflict` (409: the same client id with another body). 401 signed out (the page keeps its queue).
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, FillSnapshotEventParamSchema)
  const { deviceId, items } = await validBody(event, FillSyncRequestSchema)
  return syncOfflineFills(actor, id, deviceId, items)
})
