import { z } from 'zod'
import { FILL_REASON_CODES } from '../utils/fill-reasons'
import { PRESSURE_ENTRY_UNITS } from '../utils/units'
import { uuidField } from './fills'

/** At most this many queued items in one sync call; the page sends a longer queue in turns. */
export const MAX_SYNC_ITEMS = 200

/** `POST /api/events/[id]/fill-snapshots`: the device the snapshot is for (a UUID the page made once). */
export const FillSnapshotRequestSchema = z.object({
  deviceId: uuidField('the device'),
}).strict()
export type FillSnapshotRequest = z.infer<typeof FillSnapshotRequestSchema>

/** `DELETE /api/events/[id]/fill-snapshots/[deviceId]`. */
export const FillSnapshotDeviceParamSchema = z.object({
  id: z.string().uuid().transform(id => id.toLowerCase()),
  deviceId: z.string().uuid().transform(id => id.toLowerCase()),
})

/** The event id of the snapshot and sync routes. */
export const FillSnapshotEventParamSchema = z.object({ id: z.string().uuid().transform(id => id.toLowerCase()) })

/** One fill or refusal the device recorded offline (see OfflineFillItem). */
export const OfflineFillItemSchema = z.object({
  clientId: uuidField('the queued fill'),
  recordedAt: z.string({ required_error: 'When was it recorded?', invalid_type_error: 'When was it recorded?' })
    .datetime({ offset: true, message: 'The recorded time is an ISO instant' }),
  memberId: uuidField('the member'),
  vesselId: uuidField('the vessel'),
  stationId: uuidField('the fill station'),
  pressure: z.number({ invalid_type_error: 'The pressure must be a number', required_error: 'Enter the pressure' })
    .finite('The pressure must be a number').positive('The pressure must be more than 0').max(5000, 'The pressure is at most 5000 in any unit'),
  unit: z.enum(PRESSURE_ENTRY_UNITS, { errorMap: () => ({ message: 'Use bar, psi, kPa or MPa' }) }),
  waterVolumeL: z.number({ invalid_type_error: 'The water volume must be a number', required_error: 'Enter the water volume (L)' })
    .finite('The water volume must be a number').min(0, 'The water volume is 0 L or more').max(100, 'The water volume is at most 100 L'),
  supervised: z.boolean({ invalid_type_error: 'Supervised is yes or no', required_error: 'Supervised is yes or no' }),
  allowed: z.boolean({ invalid_type_error: 'Allowed is yes or no', required_error: 'Allowed is yes or no' }),
  reasonCodes: z.array(z.enum(FILL_REASON_CODES, { errorMap: () => ({ message: 'Not a fill reason code' }) })).max(FILL_REASON_CODES.length),
}).strict().refine(i => i.allowed === (i.reasonCodes.length === 0), { message: 'An allowed fill has no reasons; a refusal has at least one', path: ['reasonCodes'] })
export type OfflineFillItemInput = z.infer<typeof OfflineFillItemSchema>

/** `POST /api/events/[id]/fill-sync`: the device and its queue, oldest first. */
export const FillSyncRequestSchema = z.object({
  deviceId: uuidField('the device'),
  items: z.array(OfflineFillItemSchema, { required_error: 'Send the queued fills', invalid_type_error: 'Send the queued fills' })
    .min(1, 'Send at least one queued fill').max(MAX_SYNC_ITEMS, `Send at most ${MAX_SYNC_ITEMS} queued fills at a time`),
}).strict()
export type FillSyncRequest = z.infer<typeof FillSyncRequestSchema>
