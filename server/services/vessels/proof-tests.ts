import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import type { Reason } from '../../utils/errors'
import { lockVessel } from '../../utils/locks'
import { recordAudit } from '../audit'
import type { ProofTestInput } from '#shared/schemas/proof'
import type { ProofTestDto, VesselEventDto, VesselHistoryDto } from '#shared/types/proof-tests'
import { earliestProofDate, ratedFillBar } from '#shared/utils/vessel-arithmetic'
import { PA_PER_BAR, pressureToPa } from '#shared/utils/units'
import { vesselTransition } from '#shared/utils/vessel-transitions'
import { clubVesselRules } from './policy'
import { validRankOf } from '../tiers'
import { tierCode } from '#shared/utils/tier-rules'
import { vesselDto, type VesselViewer } from './registry'

/** The lowest tier a proof-test witness holds (T3). */
export const WITNESS_MIN_TIER_RANK = 3

/** The highest test pressure a proof may record, bar (the table's check). */
export const MAX_PROOF_PRESSURE_BAR = 300

interface ProofRow {
  id: string
  vessel_id: string
  tested_on: string
  medium: 'water' | 'air'
  pressure_bar: string
  hold_s: number
  result: ProofTestDto['result']
  failure_location: ProofTestDto['failureLocation']
  notes: string | null
  gauge_photo_id: string | null
  margin_ratio: string | null
  rated_fill_bar: string | null
  witness_membership_id: string
  witness_name: string
  created_at: Date
}

const PROOF_COLUMNS = `p.id, p.vessel_id, p.tested_on::text AS tested_on, p.medium, p.pressure_bar, p.hold_s, p.result,
  p.failure_location, p.notes, p.gauge_photo_id, p.margin_ratio, p.rated_fill_bar, p.witness_membership_id,
  u.name AS witness_name, p.created_at`

function toProofDto(r: ProofRow): ProofTestDto {
  return {
    id: r.id,
    vesselId: r.vessel_id,
    testedOn: r.tested_on,
    medium: r.medium,
    pressureBar: Number(r.pressure_bar),
    holdS: r.hold_s,
    result: r.result,
    failureLocation: r.failure_location,
    notes: r.notes,
    gaugePhotoId: r.gauge_photo_id,
    marginRatio: r.margin_ratio === null ? null : Number(r.margin_ratio),
    ratedFillBar: r.rated_fill_bar === null ? null : Number(r.rated_fill_bar),
    witness: { id: r.witness_membership_id, name: r.witness_name },
    recordedAt: r.created_at.toISOString(),
  }
}

/**
 * Bar to two decimals, the way the table keeps it. The proof pressure and the rated fill are both
 * rounded down, never up: a record never claims more pressure than the gauge showed.
 */
const toHundredths = (bar: number, down = false) => (down ? Math.floor(bar * 100 + 1e-9) : Math.round(bar * 100)) / 100

/**
 * An instructor (`witness`) records vessel `vesselId`'s proof test. Refused with every reason that
 * applies: the owner may not witness their own vessel; the vessel's state must allow a proof (the
 * transition table); not before the club's cure wait after the last layup; air only when the club
 * allows it; a gauge photo must be one of this vessel's gauge photos; the witness holds a valid T3 or higher. A pass rates the vessel (proof ÷
 * the club's margin, rounded down to 0.01 bar) and puts it in service; a leak leaves it awaiting
 * proof; a burst or permanent deformation fails it. Audited; the owner's proof request is settled.
 */
export async function recordProofTest(witness: Actor, vesselId: string, input: ProofTestInput): Promise<ProofTestDto> {
  const clubId = witness.club.id
  return inTransaction(async (transaction) => {
    const vessel = await lockVessel(clubId, vesselId, transaction)
    if (!vessel) notFound('No such vessel')
    const rules = (await clubVesselRules(clubId, transaction))!
    const before = await vesselDto(vessel, transaction)
    const reasons: Reason[] = []
    if (vessel.ownerMembershipId === witness.membership.id) {
      reasons.push({ code: 'WITNESS_IS_OWNER', message: 'An owner may not witness the proof test of their own vessel: another instructor records it.' })
    }
    // A witness vouches for a vessel at pressure: they must hold a valid T3 or higher themselves.
    const witnessRank = await validRankOf(witness.membership.id, rules.today, transaction)
    if (witnessRank === null || witnessRank < WITNESS_MIN_TIER_RANK) {
      reasons.push({ code: 'WITNESS_TIER_TOO_LOW', message: `A proof-test witness must hold a valid ${tierCode(WITNESS_MIN_TIER_RANK)} or higher${witnessRank === null ? '; you hold no valid tier' : `; yours is ${tierCode(witnessRank)}`}.` })
    }
    const transition = vesselTransition(before.proof.effectiveState, { kind: 'proof', result: input.result })
    if (!transition.allowed) reasons.push(transition.reason)
    const testedOn = input.testedOn ?? rules.today
    if (testedOn > rules.today) reasons.push({ code: 'TEST_DATE_IN_FUTURE', message: `A proof test is recorded once it has happened (today is ${rules.today}).` })
    if (vessel.lastLayupOn) {
      const earliest = earliestProofDate(vessel.lastLayupOn, rules.policy.cureWaitDays)
      if (testedOn < earliest) {
        reasons.push({ code: 'CURE_WAIT', message: `The laminate laid up on ${vessel.lastLayupOn} cures for ${rules.policy.cureWaitDays} days: the earliest proof test is on ${earliest}.` })
      }
    }
    if (input.medium === 'air' && !rules.policy.airTestsAllowed) {
      reasons.push({ code: 'AIR_TESTS_NOT_ALLOWED', message: 'The club does not allow air proof tests: test full of water.' })
    }
    const pressureBar = toHundredths(pressureToPa(input.pressure, input.unit) / PA_PER_BAR, true)
    if (pressureBar <= 0 || pressureBar > MAX_PROOF_PRESSURE_BAR) {
      reasons.push({ code: 'PRESSURE_OUT_OF_RANGE', message: `The test pressure must be more than 0 and at most ${MAX_PROOF_PRESSURE_BAR} bar (got ${pressureBar} bar).` })
    }
    if (input.gaugePhotoId) {
      const [photo] = await useDb().query<{ id: string }>(
        `SELECT id FROM photos WHERE id = :id AND club_id = :clubId AND vessel_id = :vesselId AND purpose = 'gauge'`,
        { replacements: { id: input.gaugePhotoId, clubId, vesselId: vessel.id }, type: QueryTypes.SELECT, transaction })
      if (!photo) reasons.push({ code: 'GAUGE_PHOTO_NOT_FOUND', message: 'The gauge photo must be a gauge photo uploaded for this vessel.' })
    }
    if (reasons.length || !transition.allowed) refuse(reasons)

    const pass = input.result === 'pass'
    const margin = rules.policy.marginRatio
    const rated = pass ? toHundredths(ratedFillBar(pressureBar, margin), true) : null
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO proof_tests (club_id, vessel_id, witness_membership_id, tested_on, medium, pressure_bar, hold_s, result,
        failure_location, notes, gauge_photo_id, margin_ratio, rated_fill_bar)
      VALUES (:clubId, :vesselId, :witness, :testedOn, :medium, :pressureBar, :holdS, :result, :location, :notes, :photo, :margin, :rated)
      RETURNING id`,
      {
        replacements: {
          clubId, vesselId: vessel.id, witness: witness.membership.id, testedOn, medium: input.medium, pressureBar,
          holdS: input.holdS, result: input.result, location: pass ? null : input.failureLocation ?? null,
          notes: input.notes ?? null, photo: input.gaugePhotoId ?? null, margin: pass ? margin : null, rated,
        },
        type: QueryTypes.SELECT,
        transaction,
      })
    await vessel.update({ state: transition.to, proofRequestedAt: null }, { transaction })
    await recordAudit(witness, clubId, {
      action: 'vessel.proof_test', subjectType: 'vessel', subjectId: vessel.id,
      before: { state: before.proof.effectiveState },
      after: { state: transition.to, result: input.result, medium: input.medium, pressureBar, ratedFillBar: rated },
    }, transaction)
    const [made] = await proofRows('p.id = :id', { id: row!.id }, transaction)
    return made!
  })
}

async function proofRows(where: string, replacements: Record<string, unknown>, transaction?: Transaction): Promise<ProofTestDto[]> {
  const rows = await useDb().query<ProofRow>(
    `SELECT ${PROOF_COLUMNS} FROM proof_tests p JOIN memberships m ON m.id = p.witness_membership_id JOIN users u ON u.id = m.user_id
    WHERE ${where} ORDER BY p.tested_on DESC, p.created_at DESC`,
    { replacements, type: QueryTypes.SELECT, transaction })
  return rows.map(toProofDto)
}

/**
 * Vessel `vesselId`'s proof tests and event log, newest first, for whoever may see the vessel (its
 * owner, or a holder of vessels.read_all); null otherwise, which the route answers with 404.
 */
export async function vesselHistory(viewer: VesselViewer, vesselId: string): Promise<VesselHistoryDto | null> {
  const [visible] = await useDb().query<{ id: string }>(
    `SELECT id FROM vessels WHERE id = :id AND club_id = :clubId ${viewer.readAll ? '' : 'AND owner_membership_id = :self'}`,
    { replacements: { id: vesselId, clubId: viewer.clubId, self: viewer.membershipId }, type: QueryTypes.SELECT })
  if (!visible) return null
  const proofTests = await proofRows('p.vessel_id = :id', { id: vesselId })
  const events = await useDb().query<{ id: string, kind: VesselEventDto['kind'], happened_on: string, reason: string, new_layup_on: string | null, by_membership_id: string, by_name: string, created_at: Date }>(
    `SELECT e.id, e.kind, e.happened_on::text AS happened_on, e.reason, e.new_layup_on::text AS new_layup_on,
      e.by_membership_id, u.name AS by_name, e.created_at
    FROM vessel_events e JOIN memberships m ON m.id = e.by_membership_id JOIN users u ON u.id = m.user_id
    WHERE e.vessel_id = :id ORDER BY e.happened_on DESC, e.created_at DESC`,
    { replacements: { id: vesselId }, type: QueryTypes.SELECT })
  return {
    proofTests,
    events: events.map(e => ({
      id: e.id, kind: e.kind, happenedOn: e.happened_on, reason: e.reason, newLayupOn: e.new_layup_on,
      by: { id: e.by_membership_id, name: e.by_name }, recordedAt: e.created_at.toISOString(),
    })),
  }
}
