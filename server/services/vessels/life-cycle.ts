import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import type { Reason } from '../../utils/errors'
import { lockVessel } from '../../utils/locks'
import type { Vessel } from '../../models'
import { recordAudit } from '../audit'
import type { AuditAction } from '#shared/utils/audit-actions'
import type { VesselEventReport } from '#shared/schemas/proof'
import type { VesselDto } from '#shared/types/vessels'
import { vesselTransition, type VesselAction, type VesselEventKind } from '#shared/utils/vessel-transitions'
import { clubVesselRules } from './policy'
import { vesselDto } from './registry'

/** Who acts on a vessel, and what the route found they may do beyond being its owner. */
export interface VesselActor {
  actor: Actor
  /** vessels.read_all: may act on any member's vessel where the rule allows officers. */
  readAll: boolean
  /** vessels.quarantine: the safety officer. */
  quarantine: boolean
}

interface Change {
  action: VesselAction
  kind: VesselEventKind
  audit: AuditAction
  happenedOn?: string
  reason: string
  newLayupOn?: string | null
  /** Who besides the owner may do it; null: only the capability (quarantine, release). */
  others: 'readAll' | 'quarantine' | null
}

/**
 * Applies `change` to vessel `vesselId` under its row lock: the vessel must be visible (the owner's,
 * or any with vessels.read_all, else 404), the actor allowed (else 403) and the transition table must
 * allow it from the vessel's effective state (else 422 with the reason). Logs the event, moves the
 * state, audits, and returns the vessel as it now stands.
 */
async function changeVessel(who: VesselActor, vesselId: string, change: Change): Promise<VesselDto> {
  const clubId = who.actor.club.id
  return inTransaction(async (transaction) => {
    const vessel = await lockVessel(clubId, vesselId, transaction)
    const owner = vessel?.ownerMembershipId === who.actor.membership.id
    if (!vessel || (!owner && !who.readAll)) notFound('No such vessel')
    const permitted = change.others === null ? who.quarantine : (owner || who[change.others])
    if (!permitted) throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the owner or the safety officer may do this.' })
    return applyChange(who.actor, vessel, change, transaction)
  })
}

/** Moves locked vessel `vessel` by `change` inside `transaction` (the table decides), logs, audits. */
async function applyChange(actor: Actor, vessel: Vessel, change: Omit<Change, 'others'>, transaction: Transaction): Promise<VesselDto> {
  const clubId = vessel.clubId
  const rules = (await clubVesselRules(clubId, transaction))!
  const before = await vesselDto(vessel, transaction)
  const reasons: Reason[] = []
  const transition = vesselTransition(before.proof.effectiveState, change.action)
  if (!transition.allowed) reasons.push(transition.reason)
  const happenedOn = change.happenedOn ?? rules.today
  if (happenedOn > rules.today) reasons.push({ code: 'EVENT_DATE_IN_FUTURE', message: `Report what has happened (today is ${rules.today}).` })
  if (change.newLayupOn) {
    if (!vessel.fibreClass) reasons.push({ code: 'NO_LAMINATE', message: 'Only a vessel with a laminate has a layup date.' })
    if (change.newLayupOn > rules.today) reasons.push({ code: 'LAYUP_DATE_IN_FUTURE', message: `The new layup date must not be after today (${rules.today}).` })
  }
  if (reasons.length || !transition.allowed) refuse(reasons)

  await insertEvent(vessel, { kind: change.kind, happenedOn, reason: change.reason, newLayupOn: change.newLayupOn ?? null, by: actor.membership.id }, transaction)
  await vessel.update({
    state: transition.to,
    ...(change.newLayupOn ? { lastLayupOn: change.newLayupOn } : {}),
    // A held or finished vessel waits for no proof test.
    ...(transition.to === 'quarantined' || transition.to === 'retired' ? { proofRequestedAt: null } : {}),
  }, { transaction })
  await recordAudit(actor, clubId, {
    action: change.audit, subjectType: 'vessel', subjectId: vessel.id,
    before: { state: before.proof.effectiveState },
    after: { state: transition.to, kind: change.kind, happenedOn, ...(change.newLayupOn ? { newLayupOn: change.newLayupOn } : {}) },
    reason: change.reason,
  }, transaction)
  return vesselDto(vessel, transaction)
}

/**
 * An incident report names vessel `vesselId` of club `clubId`: it is quarantined at once, inside the
 * report's `transaction` (any member reports, so no capability is asked; the vessel need not be the
 * reporter's). The vessel log keeps an `incident` event. A vessel already quarantined, failed or
 * retired stays as it is. Takes the vessel's row lock (step 3 of the lock order). Returns the state
 * the vessel is in afterwards, or null when the club has no such vessel.
 */
export async function quarantineForIncident(actor: Actor, clubId: string, vesselId: string, happenedOn: string, reason: string, transaction: Transaction): Promise<{ state: string, quarantined: boolean } | null> {
  const vessel = await lockVessel(clubId, vesselId, transaction)
  if (!vessel) return null
  const before = await vesselDto(vessel, transaction)
  if (!vesselTransition(before.proof.effectiveState, { kind: 'quarantine' }).allowed) return { state: vessel.state, quarantined: false }
  const after = await applyChange(actor, vessel, { action: { kind: 'quarantine' }, kind: 'incident', audit: 'vessel.quarantine', happenedOn, reason }, transaction)
  return { state: after.state, quarantined: true }
}

async function insertEvent(vessel: Vessel, e: { kind: VesselEventKind, happenedOn: string, reason: string, newLayupOn: string | null, by: string }, transaction: Transaction) {
  await useDb().query(
    `INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id, new_layup_on)
    VALUES (:clubId, :vesselId, :kind, :happenedOn, :reason, :by, :newLayupOn)`,
    { replacements: { clubId: vessel.clubId, vesselId: vessel.id, ...e }, type: QueryTypes.INSERT, transaction })
}

/**
 * The owner, or an officer with vessels.read_all, reports a repair, modification, damage, crash or
 * heat exposure: the proof ends at once and the vessel awaits a new proof test (a repair or
 * modification may lay the laminate up again, which restarts the cure clock).
 */
export function reportVesselEvent(who: VesselActor, vesselId: string, input: VesselEventReport): Promise<VesselDto> {
  return changeVessel(who, vesselId, {
    action: { kind: 'report', event: input.kind }, kind: input.kind, audit: 'vessel.report', happenedOn: input.happenedOn,
    reason: input.reason, newLayupOn: input.newLayupOn, others: 'readAll',
  })
}

/** The safety officer quarantines a vessel that is not failed or retired, with a reason. */
export function quarantineVessel(who: VesselActor, vesselId: string, reason: string): Promise<VesselDto> {
  return changeVessel(who, vesselId, { action: { kind: 'quarantine' }, kind: 'quarantine', audit: 'vessel.quarantine', reason, others: null })
}

/** The safety officer releases a quarantined vessel after review: it awaits a new proof test. */
export function releaseVessel(who: VesselActor, vesselId: string, reason: string): Promise<VesselDto> {
  return changeVessel(who, vesselId, { action: { kind: 'release' }, kind: 'release', audit: 'vessel.release', reason, others: null })
}

/** The owner or the safety officer retires a vessel for good, with a reason. */
export function retireVessel(who: VesselActor, vesselId: string, reason: string): Promise<VesselDto> {
  return changeVessel(who, vesselId, { action: { kind: 'retire' }, kind: 'retire', audit: 'vessel.retire', reason, others: 'quarantine' })
}
