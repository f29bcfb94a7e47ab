import { QueryTypes, type Transaction } from 'sequelize'
import { actorCan, type Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { gatherFillFacts, type GatheredFillFacts } from './facts'
import type { FillRequest } from '#shared/schemas/fills'
import type { FillCheckDto, FillRecordedDto } from '#shared/types/fills'
import { decideFill, type FillDecision } from '#shared/utils/fill-gate'
import { airCharge } from '#shared/utils/vessel-arithmetic'
import { pressureToPa, PA_PER_BAR } from '#shared/utils/units'

/** The highest pressure the fill log stores (its check); no vessel, station or event goes near it. */
export const MAX_LOGGED_PRESSURE_BAR = 1000

/** 400 with one field's message, as a schema refusal reads. */
function badField(field: string, message: string): never {
  throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `${field}: ${message}`, data: { fields: { [field]: message } } })
}

/**
 * The checks that come before any decision, in the order a caller meets them: 403 for another
 * member's fill without `fills.record_any`; 400 for a pressure above what any fill may be; then, from
 * the gathered facts, 404 for a member, vessel (or a vessel not theirs), event or fill station the
 * club does not have, 409 for a cancelled event, and 400 for water at or above the vessel's volume.
 */
function precheck(actor: Actor, input: FillRequest, requestedBar: number): void {
  if (input.memberId !== actor.membership.id && !actorCan(actor, 'fills.record_any')) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'You check and record fills for yourself only (fills.record_any)' })
  }
  if (requestedBar > MAX_LOGGED_PRESSURE_BAR) badField('pressure', `The pressure is at most ${MAX_LOGGED_PRESSURE_BAR} bar in any unit`)
}

function checkFound(input: FillRequest, facts: GatheredFillFacts): asserts facts is GatheredFillFacts & { member: NonNullable<GatheredFillFacts['member']>, vessel: NonNullable<GatheredFillFacts['vessel']>, event: NonNullable<GatheredFillFacts['event']>, station: NonNullable<GatheredFillFacts['station']> } {
  if (!facts.member) notFound('No such member')
  if (!facts.vessel || facts.vessel.ownerMembershipId !== input.memberId) notFound('No such vessel of this member')
  if (!facts.event) notFound('No such event')
  if (!facts.station) notFound('No such fill station')
  if (facts.event.cancelled) conflict('This event was cancelled: no fills are checked or recorded for it.')
  if (input.waterVolumeL >= facts.vessel.volumeL) badField('waterVolumeL', `The water must be less than the vessel's volume (${facts.vessel.volumeL} L)`)
}

/** The request in bar gauge, at full precision (never rounded before the comparison). */
export function requestedPressureBar(input: Pick<FillRequest, 'pressure' | 'unit'>): number {
  return pressureToPa(input.pressure, input.unit) / PA_PER_BAR
}

interface Judged { decision: FillDecision, dto: FillCheckDto, facts: GatheredFillFacts }

/** Gathers the facts (inside `transaction` when recording) and decides; throws the pre-decision errors. */
async function judge(actor: Actor, input: FillRequest, recording: boolean, transaction?: Transaction, now = new Date()): Promise<Judged> {
  const requestedBar = requestedPressureBar(input)
  precheck(actor, input, requestedBar)
  const today = clubToday(actor.club, now)
  const facts = await gatherFillFacts({
    clubId: actor.club.id, graceDays: actor.club.graceDays, today, memberId: input.memberId, vesselId: input.vesselId,
    eventId: input.eventId, stationId: input.stationId, callerId: actor.membership.id,
  }, transaction)
  checkFound(input, facts)
  const decision = decideFill({
    requestedBar, today, recording, supervised: input.supervised,
    member: facts.member, tiers: facts.tiers, juniorCapRank: facts.juniorCapRank, courses: facts.courses,
    vessel: facts.vessel, event: facts.event, station: facts.station,
    caller: {
      isMember: input.memberId === actor.membership.id,
      onEventStaff: facts.callerOnStaff,
      instructor: actorCan(actor, 'training.run'),
      validRank: facts.callerValidRank,
    },
  })
  const charge = airCharge({ gaugePressure: input.pressure, unit: input.unit, vesselVolumeL: facts.vessel.volumeL, waterVolumeL: input.waterVolumeL, distanceRule: facts.distanceRule })
  const dto: FillCheckDto = {
    allowed: decision.allowed,
    requested: { pressureBar: requestedBar },
    permittedMaxBar: decision.permittedMaxBar,
    limitingFactor: decision.limitingFactor,
    reasons: decision.reasons,
    airCharge: { storedEnergyJ: charge.storedEnergyJ, tntEquivalentKg: charge.tntEquivalentKg, minimumDistanceM: charge.minimumDistanceM },
  }
  return { decision, dto, facts }
}

/**
 * The fill check (a what-if at the launch table or before the day): the gate's whole answer for the
 * fill `input` asked by `actor`. Writes nothing; a "no" is an answer, not an error.
 */
export async function checkFill(actor: Actor, input: FillRequest, now = new Date()): Promise<FillCheckDto> {
  return (await judge(actor, input, false, undefined, now)).dto
}

/**
 * Records the fill `input` by `actor`: the gate runs again inside one transaction with the vessel's
 * row locked (lock order step 3) and its facts re-read under the lock, so parallel fills of one
 * vessel count each other and never pass its fill-count limit. An allowed fill is logged and
 * returned; a refused one is logged as a refused attempt (committed: the one write a refusal makes)
 * and answered 422 with every reason and the decision.
 */
export async function recordFill(actor: Actor, input: FillRequest, now = new Date()): Promise<FillRecordedDto> {
  const { dto, row } = await inTransaction(async (transaction) => {
    // Taken before anything is read, so the fill count read below includes every fill committed before ours.
    await lockVessel(actor.club.id, input.vesselId, transaction)
    const judged = await judge(actor, input, true, transaction, now)
    const row = await insertFill(actor, input, judged, transaction)
    return { dto: judged.dto, row }
  })
  if (!dto.allowed) {
    throw createError({ statusCode: 422, statusMessage: 'Refused', message: dto.reasons.map(r => r.message).join(' '), data: { ...dto, attemptId: row.id } })
  }
  return { ...dto, id: row.id, recordedAt: new Date(row.created_at).toISOString() }
}

async function insertFill(actor: Actor, input: FillRequest, { dto, facts }: Judged, transaction: Transaction): Promise<{ id: string, created_at: Date }> {
  const callerId = actor.membership.id
  const [row] = await useDb().query<{ id: string, created_at: Date }>(
    `INSERT INTO fills (club_id, event_id, held_on, station_id, membership_id, vessel_id, recorded_by_membership_id, supervisor_membership_id,
       pressure_bar, entered_pressure, entered_unit, water_volume_l, allowed, permitted_max_bar, limiting_factor, reasons,
       stored_energy_j, tnt_equivalent_kg, minimum_distance_m, tier_rank)
     VALUES (:clubId, :eventId, :heldOn, :stationId, :memberId, :vesselId, :callerId, :supervisorId,
       :pressureBar, :pressure, :unit, :water, :allowed, :max, :factor, CAST(:reasons AS jsonb), :energy, :tnt, :distance, :tierRank)
     RETURNING id, created_at`,
    {
      replacements: {
        clubId: actor.club.id, eventId: input.eventId, heldOn: facts.event!.heldOn, stationId: input.stationId, memberId: input.memberId,
        vesselId: input.vesselId, callerId,
        // The supervisor is the caller; a member's own "supervised" fill is refused and logged without one.
        supervisorId: input.supervised && callerId !== input.memberId ? callerId : null,
        pressureBar: dto.requested.pressureBar, pressure: input.pressure, unit: input.unit, water: input.waterVolumeL,
        allowed: dto.allowed, max: dto.permittedMaxBar, factor: dto.limitingFactor, reasons: JSON.stringify(dto.reasons),
        energy: dto.airCharge.storedEnergyJ, tnt: dto.airCharge.tntEquivalentKg, distance: dto.airCharge.minimumDistanceM,
        // The filler's own highest valid tier as the gate saw it (the desk's "fills by tier").
        tierRank: facts.member?.validRank ?? null,
      },
      type: QueryTypes.SELECT,
      transaction,
    })
  return row!
}
