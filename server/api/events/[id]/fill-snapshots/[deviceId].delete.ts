import { FillSnapshotDeviceParamSchema } from '#shared/schemas/fill-snapshots'
import { releaseSnapshotDevice } from '../../../../services/fills'

/**
 * Releases a device's reservation at the event (204, again and again alike), once it has synced: its
 * unused fills go back to online fills and other devices. The event's staff with fills.record_any.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'fills.record_any')
  const { id, deviceId } = validParams(event, FillSnapshotDeviceParamSchema)
  await releaseSnapshotDevice(actor, id, deviceId)
  setResponseStatus(event, 204)
  return null
})
