import { openDB, type DBSchema, type IDBPDatabase } from 'idb'
import type { SignedFillSnapshotDto } from '~~/shared/types/fill-snapshots'
import type { QueuedFill, UsedFills } from '~~/shared/utils/fill-queue'

/** A snapshot as this device keeps it: the signed bytes and signature exactly as received, per event. */
export interface HeldSnapshot extends SignedFillSnapshotDto {
  eventId: string
  /** Fills of each vessel this device has recorded as allowed since the snapshot (its use of the reservation). */
  used: UsedFills
}

interface FillDeviceDb extends DBSchema {
  device: { key: string, value: string }
  snapshots: { key: string, value: HeldSnapshot }
  queue: { key: string, value: QueuedFill, indexes: { eventId: string } }
}

let db: Promise<IDBPDatabase<FillDeviceDb>> | undefined

/** The device's IndexedDB database: its id, one signed snapshot per event, and the queue. Nothing else of the club's. */
function open(): Promise<IDBPDatabase<FillDeviceDb>> {
  db ??= openDB<FillDeviceDb>('hoopwise-fill', 1, {
    upgrade(d) {
      d.createObjectStore('device')
      d.createObjectStore('snapshots', { keyPath: 'eventId' })
      d.createObjectStore('queue', { keyPath: 'clientId' }).createIndex('eventId', 'eventId')
    },
  })
  return db
}

/**
 * The launch-side fill page's storage on this device (client only): the device's id (a random UUID made
 * once), the event's signed snapshot with the fills used of its reservation, and the queue of fills and
 * refusals recorded without a network.
 */
export function useFillDevice() {
  return {
    /** This device's id, made once and kept. */
    async deviceId(): Promise<string> {
      const d = await open()
      const known = await d.get('device', 'id')
      if (known) return known
      const id = crypto.randomUUID()
      await d.put('device', id, 'id')
      return id
    },
    snapshot: async (eventId: string) => (await open()).get('snapshots', eventId),
    /** Keeps a freshly downloaded snapshot (the fills used start again: the reservation is new). */
    keepSnapshot: async (eventId: string, signed: SignedFillSnapshotDto) =>
      (await open()).put('snapshots', { eventId, snapshot: signed.snapshot, signature: signed.signature, used: {} }),
    forgetSnapshot: async (eventId: string) => (await open()).delete('snapshots', eventId),
    queue: async (eventId: string) => (await open()).getAllFromIndex('queue', 'eventId', eventId),
    /** Queues `item` and, in the same transaction, counts its fill against the reservation. */
    async enqueue(item: QueuedFill, used: UsedFills): Promise<void> {
      const d = await open()
      const tx = d.transaction(['queue', 'snapshots'], 'readwrite')
      const held = await tx.objectStore('snapshots').get(item.eventId)
      await tx.objectStore('queue').add(item)
      if (held) await tx.objectStore('snapshots').put({ ...held, used })
      await tx.done
    },
    /** Replaces the event's queue with `remaining` (after a sync). */
    async replaceQueue(eventId: string, remaining: QueuedFill[]): Promise<void> {
      const d = await open()
      const tx = d.transaction('queue', 'readwrite')
      for (const key of await tx.store.index('eventId').getAllKeys(eventId)) await tx.store.delete(key)
      for (const item of remaining) await tx.store.put(item)
      await tx.done
    },
  }
}
