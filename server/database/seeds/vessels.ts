import { QueryTypes } from 'sequelize'
import { Vessel } from '../../models'
import { addCalendarDays } from '#shared/utils/dates'
import type { VesselRegistration } from '#shared/schemas/vessel'
import { vesselTag, type VesselState } from '#shared/utils/vessel-states'
import { DEFAULT_PROOF_POLICY } from '#shared/utils/vessel-arithmetic'
import type { FailureLocation, ProofResult, VesselEventKind } from '#shared/utils/vessel-transitions'
import type { SeedContext } from './context'

const MEMBER = 'member@hoopwise.example'
const INSTRUCTOR = 'instructor@hoopwise.example'
const SAFETY = 'safety@hoopwise.example'
const ODILE = 'odile.marshcombe@members.hoopwise.example' // an instructor
const BRAM = 'bram.saltreed@members.hoopwise.example' // an instructor
const ULRIC = 'ulric.ebbridge@members.hoopwise.example'
const VESNA = 'vesna.fluke@members.hoopwise.example'
const WREN = 'wren.gullyhaven@members.hoopwise.example'
const XANTHE = 'xanthe.kelpford@members.hoopwise.example'
const YESTIN = 'yestin.mudlark@members.hoopwise.example'

interface DemoProof { daysAgo: number, pressureBar: number, result: ProofResult, location?: FailureLocation, witness: string, notes?: string }
interface DemoEvent { daysAgo: number, kind: VesselEventKind, reason: string, by: string, newLayupDaysAgo?: number }

interface DemoVessel extends Omit<VesselRegistration, 'metalInPressurePath' | 'lastLayupOn'> {
  owner: string
  /** Days before the seed date of the first layup, for laminates (a repair event may lay up again). */
  layupDaysAgo?: number
  /** The state the proofs and events below lead to (the seed checks nothing; keep them in step). */
  state: VesselState
  proofs?: DemoProof[]
  events?: DemoEvent[]
  proofRequested?: boolean
}

const glass = { fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3, resin: 'Laminating epoxy' } as const
const carbon = { fibreClass: 'carbon', arealWeightGPerM2: 200, weave: 'woven_0_90', plies: 4, resin: 'Laminating epoxy' } as const

// Invented vessels in every construction and every life-cycle state, with their proof histories
// (witnessed by instructors who do not own them) under the starting policy (margin 1.5; 12 months,
// 6 for spliced bottles). The demo member's Gull is in service above 10 bar; Twin Tern's proof lapses
// within 30 days; Sandpiper's retest is due by time.
const DEMO_VESSELS: DemoVessel[] = [
  { owner: MEMBER, name: 'Gull', construction: 'single_bottle', volumeL: 2, diameterMm: 102, state: 'in_service',
    proofs: [{ daysAgo: 60, pressureBar: 16, result: 'pass', witness: INSTRUCTOR }] },
  { owner: MEMBER, name: 'Twin Tern', construction: 'spliced_bottles', volumeL: 3.6, diameterMm: 102, lengthMm: 690, state: 'in_service',
    proofs: [{ daysAgo: 165, pressureBar: 12, result: 'pass', witness: ODILE }] },
  { owner: MEMBER, name: 'Petrel', construction: 'overwrapped_liner', volumeL: 2.1, diameterMm: 104, ...glass, layupDaysAgo: 3,
    state: 'awaiting_proof', proofRequested: true },
  { owner: MEMBER, name: 'Heron', construction: 'overwrapped_liner', volumeL: 3.1, diameterMm: 104.5, ...glass, layupDaysAgo: 70,
    state: 'in_service',
    proofs: [
      { daysAgo: 50, pressureBar: 18, result: 'leak', location: 'nozzle_bond', witness: INSTRUCTOR, notes: 'Weep at the nozzle bond after 40 s.' },
      { daysAgo: 30, pressureBar: 20, result: 'pass', witness: INSTRUCTOR },
    ],
    events: [{ daysAgo: 45, kind: 'repair', reason: 'Nozzle bond cleaned back and re-bonded.', by: MEMBER, newLayupDaysAgo: 45 }] },
  { owner: INSTRUCTOR, name: 'Longshore', construction: 'mandrel_tube', volumeL: 4.2, diameterMm: 90, lengthMm: 820, ...carbon,
    layupDaysAgo: 40, state: 'in_service', proofs: [{ daysAgo: 30, pressureBar: 24, result: 'pass', witness: SAFETY }] },
  { owner: SAFETY, name: 'Old Faithful', construction: 'single_bottle', volumeL: 1.5, diameterMm: 92, state: 'retired',
    proofs: [{ daysAgo: 400, pressureBar: 15, result: 'pass', witness: INSTRUCTOR }],
    events: [{ daysAgo: 20, kind: 'retire', reason: 'Scuffed and creased after many seasons.', by: SAFETY }] },
  { owner: VESNA, name: 'Sandpiper', construction: 'single_bottle', volumeL: 1.5, diameterMm: 92, state: 'in_service',
    proofs: [{ daysAgo: 400, pressureBar: 13.5, result: 'pass', witness: ODILE }] },
  { owner: WREN, name: 'Curlew', construction: 'spliced_bottles', volumeL: 4, diameterMm: 102, lengthMm: 760, state: 'failed',
    proofs: [{ daysAgo: 20, pressureBar: 14, result: 'burst', location: 'splice', witness: INSTRUCTOR, notes: 'Split along the splice sleeve.' }] },
  { owner: XANTHE, name: 'Dunlin', construction: 'mandrel_tube', volumeL: 3.2, diameterMm: 75, lengthMm: 900, ...glass, layupDaysAgo: 35,
    state: 'failed',
    proofs: [{ daysAgo: 25, pressureBar: 18, result: 'permanent_deformation', location: 'end_fitting', witness: BRAM, notes: 'End fitting crept out 2 mm.' }] },
  { owner: YESTIN, name: 'Turnstone', construction: 'overwrapped_liner', volumeL: 2.5, diameterMm: 104, ...carbon, layupDaysAgo: 130,
    state: 'awaiting_proof',
    proofs: [{ daysAgo: 100, pressureBar: 27, result: 'pass', witness: INSTRUCTOR }],
    events: [{ daysAgo: 10, kind: 'damage', reason: 'Landed on the sea wall: scraped wrap near the shoulder.', by: YESTIN }] },
  { owner: BRAM, name: 'Godwit', construction: 'single_bottle', volumeL: 2, diameterMm: 102, state: 'quarantined',
    proofs: [{ daysAgo: 90, pressureBar: 15, result: 'pass', witness: ODILE }],
    events: [{ daysAgo: 5, kind: 'quarantine', reason: 'Held for review after a hard landing at the last launch.', by: SAFETY }] },
  { owner: YESTIN, name: 'Whimbrel', construction: 'other', volumeL: 1.8, diameterMm: 88, state: 'in_service',
    proofs: [{ daysAgo: 200, pressureBar: 12, result: 'pass', witness: BRAM }] },
  { owner: VESNA, name: 'Knot', construction: 'single_bottle', volumeL: 1.25, diameterMm: 88, state: 'awaiting_proof', proofRequested: true },
  { owner: WREN, name: 'Redshank', construction: 'overwrapped_liner', volumeL: 3, diameterMm: 104,
    fibreClass: 'aramid', arealWeightGPerM2: 170, weave: 'woven_0_90', plies: 4, resin: 'Laminating epoxy', layupDaysAgo: 60,
    state: 'in_service', proofs: [{ daysAgo: 40, pressureBar: 30, result: 'pass', witness: INSTRUCTOR }] },
  { owner: XANTHE, name: 'Avocet', construction: 'mandrel_tube', volumeL: 5, diameterMm: 90, lengthMm: 1000,
    fibreClass: 'carbon', arealWeightGPerM2: 300, weave: 'hoop_tow', plies: 3, resin: 'Laminating epoxy', layupDaysAgo: 80,
    state: 'awaiting_proof',
    proofs: [{ daysAgo: 60, pressureBar: 36, result: 'pass', witness: ODILE }],
    events: [{ daysAgo: 3, kind: 'heat_exposure', reason: 'Left in a closed car on a hot afternoon.', by: XANTHE }] },
  { owner: ULRIC, name: 'Plover', construction: 'single_bottle', volumeL: 2, diameterMm: 102, state: 'awaiting_proof',
    proofs: [{ daysAgo: 10, pressureBar: 15, result: 'leak', location: 'end_fitting', witness: INSTRUCTOR }] },
  { owner: ULRIC, name: 'Oystercatcher', construction: 'spliced_bottles', volumeL: 3.6, diameterMm: 102, lengthMm: 700, state: 'retired',
    proofs: [{ daysAgo: 300, pressureBar: 12, result: 'pass', witness: BRAM }],
    events: [{ daysAgo: 90, kind: 'retire', reason: 'Replaced by a laminate build.', by: ULRIC }] },
  { owner: INSTRUCTOR, name: 'Brent', construction: 'single_bottle', volumeL: 2, diameterMm: 102, state: 'in_service',
    proofs: [{ daysAgo: 100, pressureBar: 15, result: 'pass', witness: ODILE }] },
  { owner: SAFETY, name: 'Teal', construction: 'overwrapped_liner', volumeL: 2.4, diameterMm: 104, ...glass, layupDaysAgo: 120,
    state: 'awaiting_proof',
    proofs: [{ daysAgo: 100, pressureBar: 21, result: 'pass', witness: INSTRUCTOR }],
    events: [
      { daysAgo: 15, kind: 'quarantine', reason: 'Held while a burst of a vessel of the same layup is reviewed.', by: SAFETY },
      { daysAgo: 8, kind: 'release', reason: 'Review done: the other burst was a bonding fault. Retest before use.', by: SAFETY },
    ] },
  { owner: ODILE, name: 'Stint', construction: 'other', volumeL: 1, diameterMm: 70, state: 'in_service',
    proofs: [{ daysAgo: 20, pressureBar: 18, result: 'pass', witness: INSTRUCTOR }] },
]

/**
 * Twenty demo vessels with their proof tests and events, and the club's vessel policy (the starting
 * one). Vessels are found by owner and name, so a second run adds nothing; a new one takes its tag
 * from the club's counter, as a registration does.
 */
export async function seedVessels(ctx: SeedContext): Promise<void> {
  const { transaction, clubId } = ctx
  if (!clubId) throw new Error('seedClub must run before seedVessels')
  await ctx.sequelize.query('INSERT INTO vessel_policies (club_id) VALUES (:clubId) ON CONFLICT (club_id) DO NOTHING',
    { replacements: { clubId }, transaction })
  const membership = (email: string) => {
    const id = ctx.memberIds.get(email)
    if (!id) throw new Error(`seedMembers must run before seedVessels (${email})`)
    return id
  }
  const day = (daysAgo: number) => addCalendarDays(ctx.today, -daysAgo)
  for (const { owner, layupDaysAgo, state, proofs, events, proofRequested, ...v } of DEMO_VESSELS) {
    const ownerMembershipId = membership(owner)
    const found = await Vessel.findOne({ where: { clubId, ownerMembershipId, name: v.name }, transaction })
    if (found) continue
    // The same counter step as a registration (server/utils/locks.ts), on the seed's own connection.
    const [taken] = await ctx.sequelize.query<{ number: number, tag_prefix: string }>(
      `UPDATE clubs SET next_vessel_number = next_vessel_number + 1 WHERE id = :clubId
        RETURNING next_vessel_number - 1 AS number, tag_prefix`,
      { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
    const relaid = events?.find(e => e.newLayupDaysAgo !== undefined)?.newLayupDaysAgo
    const vessel = await Vessel.create({
      ...v,
      clubId,
      ownerMembershipId,
      number: taken!.number,
      tag: vesselTag(taken!.tag_prefix, taken!.number),
      lastLayupOn: relaid !== undefined ? day(relaid) : layupDaysAgo === undefined ? null : day(layupDaysAgo),
      state,
      proofRequestedAt: proofRequested ? new Date() : null,
    }, { transaction })
    for (const p of proofs ?? []) {
      const pass = p.result === 'pass'
      const margin = DEFAULT_PROOF_POLICY.marginRatio
      await ctx.sequelize.query(
        `INSERT INTO proof_tests (club_id, vessel_id, witness_membership_id, tested_on, pressure_bar, result, failure_location,
          notes, margin_ratio, rated_fill_bar)
        VALUES (:clubId, :vesselId, :witness, :testedOn, :pressureBar, :result, :location, :notes, :margin, :rated)`,
        {
          replacements: {
            clubId, vesselId: vessel.id, witness: membership(p.witness), testedOn: day(p.daysAgo), pressureBar: p.pressureBar,
            result: p.result, location: p.location ?? null, notes: p.notes ?? null, margin: pass ? margin : null,
            rated: pass ? Math.floor((p.pressureBar / margin) * 100) / 100 : null,
          },
          transaction,
        })
    }
    for (const e of events ?? []) {
      await ctx.sequelize.query(
        `INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id, new_layup_on)
        VALUES (:clubId, :vesselId, :kind, :happenedOn, :reason, :by, :newLayupOn)`,
        {
          replacements: {
            clubId, vesselId: vessel.id, kind: e.kind, happenedOn: day(e.daysAgo), reason: e.reason, by: membership(e.by),
            newLayupOn: e.newLayupDaysAgo === undefined ? null : day(e.newLayupDaysAgo),
          },
          transaction,
        })
    }
  }
}
