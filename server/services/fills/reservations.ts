import { QueryTypes, type Transaction } from 'sequelize'

/**
 * The fills other devices still hold of vessel `vesselColumn` (an SQL expression): the unused part of
 * every reservation of a device not released, at an event held on or after `:holdsFrom` (a reservation
 * lapses once its event's day is over), except device `:deviceId` at event `:eventId` when those are
 * given (a device never waits on its own reservation). The gate counts them as fills since the proof,
 * so online fills and other devices use only what is left.
 */
export function heldFillsSql(vesselColumn: string): string {
  return `(SELECT coalesce(sum(greatest(r.reserved - r.used, 0)), 0)::int
     FROM fill_reservations r
     JOIN fill_snapshot_devices d ON d.event_id = r.event_id AND d.device_id = r.device_id AND d.released_at IS NULL
     JOIN launch_events he ON he.id = r.event_id AND he.held_on >= CAST(:holdsFrom AS date)
    WHERE r.vessel_id = ${vesselColumn}
      AND (CAST(:deviceId AS uuid) IS NULL OR NOT (r.event_id = CAST(:eventId AS uuid) AND r.device_id = CAST(:deviceId AS uuid))))`
}

/** The device `deviceId` holding a snapshot of event `eventId`, or undefined. */
export async function snapshotDevice(eventId: string, deviceId: string, transaction?: Transaction): Promise<{ issued_by_membership_id: string, released_at: Date | null } | undefined> {
  const [row] = await useDb().query<{ issued_by_membership_id: string, released_at: Date | null }>(
    'SELECT issued_by_membership_id, released_at FROM fill_snapshot_devices WHERE event_id = :eventId AND device_id = :deviceId',
    { replacements: { eventId, deviceId }, type: QueryTypes.SELECT, transaction })
  return row
}

/**
 * Replaces device `deviceId`'s reservation at event `eventId` with `reserved` (vessel id → fills), inside
 * the snapshot's `transaction`: the device row is (re)made unreleased and its old reservations go.
 */
export async function reserveFills(input: { clubId: string, eventId: string, deviceId: string, issuedBy: string, reserved: Map<string, number> }, transaction: Transaction): Promise<void> {
  await useDb().query(
    `INSERT INTO fill_snapshot_devices (event_id, club_id, device_id, issued_by_membership_id)
     VALUES (:eventId, :clubId, :deviceId, :issuedBy)
     ON CONFLICT (event_id, device_id) DO UPDATE SET issued_by_membership_id = EXCLUDED.issued_by_membership_id, issued_at = now(), released_at = NULL`,
    { replacements: input, transaction })
  await useDb().query('DELETE FROM fill_reservations WHERE event_id = :eventId AND device_id = :deviceId',
    { replacements: input, transaction })
  const entries = [...input.reserved].filter(([, n]) => n > 0)
  if (!entries.length) return
  await useDb().query(
    `INSERT INTO fill_reservations (event_id, device_id, vessel_id, reserved)
     SELECT :eventId, :deviceId, v, n FROM unnest(ARRAY[:ids]::uuid[], ARRAY[:counts]::int[]) AS x(v, n)`,
    { replacements: { ...input, ids: entries.map(e => e[0]), counts: entries.map(e => e[1]) }, transaction })
}

/** One more of device `deviceId`'s reserved fills of `vesselId` used (an allowed or flagged fill it recorded). */
export async function useReservedFill(eventId: string, deviceId: string, vesselId: string, transaction: Transaction): Promise<void> {
  await useDb().query('UPDATE fill_reservations SET used = used + 1 WHERE event_id = :eventId AND device_id = :deviceId AND vessel_id = :vesselId',
    { replacements: { eventId, deviceId, vesselId }, transaction })
}

/** Releases device `deviceId`'s reservation at event `eventId` (nothing when already released or unknown). */
export async function releaseDevice(eventId: string, deviceId: string): Promise<void> {
  await useDb().query('UPDATE fill_snapshot_devices SET released_at = now() WHERE event_id = :eventId AND device_id = :deviceId AND released_at IS NULL',
    { replacements: { eventId, deviceId } })
}
