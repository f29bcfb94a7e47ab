import { QueryTypes, type Transaction } from 'sequelize'
import { Membership, User, Vessel } from '../models'
import { useDb } from './db'

// THE LOCK ORDER. Every row lock a request takes comes from this file, and one transaction takes
// them in this order only, so two writes that touch the same rows wait for each other instead of
// deadlocking (mapDbError still answers 409 should the database report one):
//
//   0. a payment of the payment service, by its id            lockProviderPayment (webhook events only)
//   1. memberships, in id order when there are several      lockMemberships
//   2. the account's users row                               lockUser
//   3. the club's vessel counter, then a vessel               takeVesselNumber, lockVessel
//      or every vessel of the club, in id order              lockClubVessels (fill snapshots)
//   4. training session, or booking                          lockTrainingSession, lockBooking
//      or launch event                                      lockLaunchEvent
//      or incident                                          lockIncident
//   5. payment, then the receipt counter                     lockPayment, takeReceiptNumber
//   6. one-time links (action_tokens), notices, sessions     lockNotice; links and sessions are
//                                                            updated in place after 1–2
//
// A new kind of lock gets its function here, at its place in the list. The notice queue's claims
// (`FOR UPDATE SKIP LOCKED` in services/notices/queue.ts) stand outside the order: they never wait,
// and take no other lock while they hold one.

/** Distinct ids, lower-cased and sorted: the order in which rows of one table are locked. */
export function lockOrder(ids: readonly string[]): string[] {
  return [...new Set(ids.map(id => id.toLowerCase()))].sort()
}

/**
 * Locks the membership rows `ids` (of club `clubId` when given) FOR UPDATE, in id order, inside
 * `transaction`; step 1 of the lock order. Returns the rows found, by id.
 */
export async function lockMemberships(ids: readonly string[], transaction: Transaction, clubId?: string): Promise<Map<string, Membership>> {
  const rows = new Map<string, Membership>()
  for (const id of lockOrder(ids)) {
    const row = await Membership.findOne({ where: clubId ? { id, clubId } : { id }, transaction, lock: transaction.LOCK.UPDATE })
    if (row) rows.set(row.id, row)
  }
  return rows
}

/** Locks account `userId`'s row FOR UPDATE inside `transaction` (step 2) and returns it, or null. */
export async function lockUser(userId: string, transaction: Transaction): Promise<User | null> {
  return User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE })
}

/**
 * Takes club `clubId`'s next vessel number inside `transaction` (step 3): the counter on the club's
 * row is raised under that row's lock, held until commit, so simultaneous registrations number one
 * after the other and a rolled-back one leaves no gap. Returns the number taken, or null (no club).
 */
export async function takeVesselNumber(clubId: string, transaction: Transaction): Promise<{ number: number, tagPrefix: string } | null> {
  const [row] = await useDb().query<{ number: number, tag_prefix: string }>(
    `UPDATE clubs SET next_vessel_number = next_vessel_number + 1 WHERE id = :clubId
      RETURNING next_vessel_number - 1 AS number, tag_prefix`,
    { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  return row ? { number: row.number, tagPrefix: row.tag_prefix } : null
}

/**
 * Locks vessel `id` of club `clubId` FOR UPDATE inside `transaction` (step 3, after the club's vessel
 * counter) and returns it, or null: proof tests, reports, quarantine and retirement read its state and
 * change it under this lock, so two of them never both start from the same state.
 */
export async function lockVessel(clubId: string, id: string, transaction: Transaction): Promise<Vessel | null> {
  return Vessel.findOne({ where: { id, clubId }, transaction, lock: transaction.LOCK.UPDATE })
}

/**
 * Locks every vessel of club `clubId` that may still be filled (not retired or failed) FOR UPDATE, in id
 * order, inside `transaction` (step 3, in place of one vessel): issuing a fill snapshot reserves fills of
 * all of them at once, so no fill or other snapshot counts them meanwhile.
 */
export async function lockClubVessels(clubId: string, transaction: Transaction): Promise<void> {
  await useDb().query(`SELECT id FROM vessels WHERE club_id = :clubId AND state NOT IN ('retired', 'failed') ORDER BY id FOR UPDATE`,
    { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
}

/**
 * Locks training session `id` of club `clubId` FOR UPDATE inside `transaction` (step 4) and returns what
 * enrolments and issuing decide on, or undefined: simultaneous enrolments take places one after the
 * other under it (so a session never holds more than its capacity, and arrival order is lock order).
 */
export async function lockTrainingSession(clubId: string, id: string, transaction: Transaction): Promise<{ id: string, capacity: number, starts_at: Date, ends_at: Date, issued_at: Date | null, instructor_membership_id: string, course_id: string } | undefined> {
  const [row] = await useDb().query<{ id: string, capacity: number, starts_at: Date, ends_at: Date, issued_at: Date | null, instructor_membership_id: string, course_id: string }>(
    `SELECT id, capacity, starts_at, ends_at, issued_at, instructor_membership_id, course_id
       FROM training_sessions WHERE id = :id AND club_id = :clubId FOR UPDATE`,
    { replacements: { id, clubId }, type: QueryTypes.SELECT, transaction })
  return row
}

/** Locks notice `id` of club `clubId` FOR UPDATE (step 6) and returns what a retry decides on, or undefined. */
export async function lockNotice(clubId: string, id: string, transaction: Transaction): Promise<{ status: string, kind: string, attempts: number } | undefined> {
  const [row] = await useDb().query<{ status: string, kind: string, attempts: number }>(
    'SELECT status, kind, attempts FROM notices WHERE id = :id AND club_id = :clubId FOR UPDATE',
    { replacements: { id, clubId }, type: QueryTypes.SELECT, transaction })
  return row
}

/**
 * Locks booking `id` of club `clubId` FOR UPDATE (step 4) and returns what a cancellation decides on,
 * or undefined: two cancellations of one booking wait for each other instead of both e-mailing.
 */
export async function lockBooking(clubId: string, id: string, transaction: Transaction): Promise<{ membership_id: string, station_id: string, starts_at: Date, ends_at: Date, cancelled_at: Date | null } | undefined> {
  const [row] = await useDb().query<{ membership_id: string, station_id: string, starts_at: Date, ends_at: Date, cancelled_at: Date | null }>(
    'SELECT membership_id, station_id, starts_at, ends_at, cancelled_at FROM bookings WHERE id = :id AND club_id = :clubId FOR UPDATE',
    { replacements: { id, clubId }, type: QueryTypes.SELECT, transaction })
  return row
}

/**
 * Takes a transaction-scoped advisory lock on the payment service's payment `providerPaymentId` (step
 * 0, webhook events only): a completion and a refund of the same payment, arriving at once, are
 * applied one after the other, so a refund that comes first is surely seen, held, by the completion.
 */
export async function lockProviderPayment(providerPaymentId: string, transaction: Transaction): Promise<void> {
  await useDb().query('SELECT pg_advisory_xact_lock(hashtext(:key))', { replacements: { key: `payment:${providerPaymentId}` }, transaction })
}

/** Locks payment `id` (of club `clubId` when given) FOR UPDATE (step 5) and returns whether it exists. */
export async function lockPayment(id: string, transaction: Transaction, clubId?: string): Promise<boolean> {
  const rows = await useDb().query<{ id: string }>(
    `SELECT id FROM payments WHERE id = :id ${clubId ? 'AND club_id = :clubId' : ''} FOR UPDATE`,
    { replacements: { id, clubId: clubId ?? null }, type: QueryTypes.SELECT, transaction })
  return rows.length > 0
}

/**
 * Takes club `clubId`'s next receipt number inside `transaction` (step 5, after the payment): raised
 * under the club row's lock, held until commit, so receipts number one after the other with no gap
 * from a rolled-back payment.
 */
export async function takeReceiptNumber(clubId: string, transaction: Transaction): Promise<number> {
  const [row] = await useDb().query<{ number: number }>(
    'UPDATE clubs SET next_receipt_number = next_receipt_number + 1 WHERE id = :clubId RETURNING next_receipt_number - 1 AS number',
    { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  if (!row) throw new Error(`no club ${clubId}`)
  return row.number
}

/**
 * Locks launch event `id` of club `clubId` FOR UPDATE (step 4) and returns what a change, a cancellation,
 * a registration or a walk-in decides on, or undefined: a move and a registration arriving at once are
 * applied one after the other, so the moved event's e-mails reach everyone registered at that moment.
 */
export async function lockLaunchEvent(clubId: string, id: string, transaction: Transaction): Promise<{ held_on: string, cancelled_at: Date | null } | undefined> {
  const [row] = await useDb().query<{ held_on: string, cancelled_at: Date | null }>(
    'SELECT held_on::text AS held_on, cancelled_at FROM launch_events WHERE id = :id AND club_id = :clubId FOR UPDATE',
    { replacements: { id, clubId }, type: QueryTypes.SELECT, transaction })
  return row
}

/**
 * Locks incident `id` of club `clubId` FOR UPDATE (step 4) and returns what a review, a closing or a
 * suspension from the incident page decides on, or undefined: two officers closing one incident at once
 * close it once and e-mail the reporter once.
 */
export async function lockIncident(clubId: string, id: string, transaction: Transaction): Promise<{ status: 'open' | 'closed', reported_by_membership_id: string } | undefined> {
  const [row] = await useDb().query<{ status: 'open' | 'closed', reported_by_membership_id: string }>(
    'SELECT status, reported_by_membership_id FROM incidents WHERE id = :id AND club_id = :clubId FOR UPDATE',
    { replacements: { id, clubId }, type: QueryTypes.SELECT, transaction })
  return row
}
