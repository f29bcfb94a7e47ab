import { beforeAll, describe, expect, it } from 'vitest'
import { clubDay, makeClub, makeFill, makeFillStation, makeLaunchEvent, makeMember, makeProofTest, makeVessel } from '../../support/factories'
import { sql } from '../../support/db'
import { deriveProofStanding } from '../../../server/services/vessels/standing'
import { proofStandingSql, tallyStandingSql } from '../../../server/services/vessels/standing-sql'
import type { VesselPolicyDto } from '../../../shared/types/proof-tests'
import { PROOF_INVALIDATING_EVENTS, VESSEL_CONSTRUCTIONS, type ProofInvalidatingEvent, type VesselConstruction } from '../../../shared/utils/vessel-arithmetic'
import type { VesselState } from '../../../shared/utils/vessel-states'

// The SQL mirror of the proof standing must answer as the TypeScript rule does. The same generated
// vessels (seeded, so a failure repeats) go to both: the rule from facts the test keeps itself, the
// mirror from the rows the test wrote. Short intervals and fill limits put many vessels on the edges:
// month ends, a test on an event's day, a fill count at the limit, an event on the test day or after today.

const POLICY: VesselPolicyDto = {
  marginRatio: 1.5,
  intervalMonths: { single_bottle: 1, spliced_bottles: 6, overwrapped_liner: 13, mandrel_tube: 3, other: 2 },
  fillLimit: { bottle: 3, laminate: 4 },
  cureWaitDays: 7, airTestsAllowed: false, distanceRule: 'tnt', kProcess: 0.5, equipmentFactor: 3,
}
const EVENT_KINDS = [...PROOF_INVALIDATING_EVENTS, 'quarantine', 'release', 'retire'] as const
const STATES: VesselState[] = ['in_service', 'in_service', 'in_service', 'in_service', 'awaiting_proof', 'quarantined', 'failed', 'retired']
const EVENT_DAYS = [-400, -200, -95, -62, -31, -30, -10, 0]

interface Case {
  vesselId: string
  state: VesselState
  construction: VesselConstruction
  passes: { testedOn: string, ratedFillBar: number }[]
  events: { kind: typeof EVENT_KINDS[number], on: string }[]
  fills: { heldOn: string, allowed: boolean }[]
}

/** A small seeded generator (mulberry32), so the cases are the same on every run. */
function generator(seed: number) {
  let a = seed
  const next = () => {
    a = (a + 0x6D2B79F5) | 0
    let t = Math.imul(a ^ (a >>> 15), 1 | a)
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  return { int: (n: number) => Math.floor(next() * n), pick: <T>(xs: readonly T[]) => xs[Math.floor(next() * xs.length)]! }
}

/** The last day of the month `back` months before today's month. */
function monthEnd(back: number): string {
  const [y, m] = clubDay(0).split('-').map(Number) as [number, number]
  return new Date(Date.UTC(y, m - back, 0)).toISOString().slice(0, 10)
}

const cases: Case[] = []
let clubId = ''
let officerId = ''
let ownerId = ''
let stationId = ''
let events: { heldOn: string, eventId: string }[] = []

beforeAll(async () => {
  const club = await makeClub()
  clubId = club.id
  const officer = await makeMember({ clubId, roles: ['instructor', 'safety_officer'] })
  const owner = await makeMember({ clubId })
  officerId = officer.memberId
  ownerId = owner.memberId
  await sql(`INSERT INTO vessel_policies (club_id, interval_months_single_bottle, interval_months_spliced_bottles, interval_months_overwrapped_liner,
      interval_months_mandrel_tube, interval_months_other, fill_limit_bottle, fill_limit_laminate)
    VALUES ($1, $2, $3, $4, $5, $6, $7, $8)`, [clubId, POLICY.intervalMonths.single_bottle, POLICY.intervalMonths.spliced_bottles,
    POLICY.intervalMonths.overwrapped_liner, POLICY.intervalMonths.mandrel_tube, POLICY.intervalMonths.other, POLICY.fillLimit.bottle, POLICY.fillLimit.laminate])
  stationId = (await makeFillStation({ clubId })).stationId
  events = await Promise.all(EVENT_DAYS.map(async d => ({ heldOn: clubDay(d), ...await makeLaunchEvent({ createdBy: officer.memberId, heldOn: clubDay(d), stationIds: [stationId] }) })))
  const g = generator(20261203)
  const testDays = [...EVENT_DAYS.map(d => clubDay(d)), monthEnd(1), monthEnd(2), monthEnd(3), monthEnd(13), clubDay(-g.int(450))]
  for (let i = 0; i < 48; i++) {
    // Every fourth vessel from the second is in service and gets a proof-ending event after its last
    // pass; every fourth from the third gets its fills after it (so the fill limit is reached too).
    const shape = i % 4
    const state = shape === 1 || shape === 2 ? 'in_service' : g.pick(STATES)
    const construction = g.pick(VESSEL_CONSTRUCTIONS)
    const { vesselId } = await makeVessel({ ownerId: owner.memberId, state, construction })
    const c: Case = { vesselId, state, construction, passes: [], events: [], fills: [] }
    // Up to three tests, some failed; two on one day now and then (the later entry wins).
    for (let k = g.int(4); k > 0; k--) {
      const testedOn = k === 1 && c.passes.length && g.int(3) === 0 ? c.passes.at(-1)!.testedOn : g.pick(testDays)
      const pass = g.int(5) > 0
      const pressureBar = 12 + g.int(10)
      await makeProofTest({ vesselId, witnessId: officer.memberId, testedOn, pressureBar, result: pass ? 'pass' : 'leak' })
      if (pass) c.passes.push({ testedOn, ratedFillBar: Math.floor((pressureBar / 1.5) * 100) / 100 })
    }
    const lastOn = c.passes.reduce<string | null>((a, p) => (a === null || p.testedOn > a ? p.testedOn : a), null)
    const later = events.filter(e => lastOn !== null && e.heldOn > lastOn)
    if (shape === 1 && later.length) {
      const e = { kind: g.pick(PROOF_INVALIDATING_EVENTS), on: g.pick(later).heldOn }
      await sql(`INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id) VALUES ($1, $2, $3, $4, 'Generated case', $5)`,
        [clubId, vesselId, e.kind, e.on, officer.memberId])
      c.events.push(e)
    }
    for (let k = g.int(3); k > 0; k--) {
      const e = { kind: g.pick(EVENT_KINDS), on: g.int(4) === 0 && c.passes.length ? c.passes.at(-1)!.testedOn : clubDay(g.int(420) - 410) }
      await sql(`INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id) VALUES ($1, $2, $3, $4, 'Generated case', $5)`,
        [clubId, vesselId, e.kind, e.on, officer.memberId])
      c.events.push(e)
    }
    const onOrAfter = events.filter(e => lastOn !== null && e.heldOn >= lastOn)
    for (let k = shape === 2 ? 5 : g.int(7); k > 0; k--) {
      const event = shape === 2 && onOrAfter.length ? g.pick(onOrAfter) : g.pick(events)
      const allowed = g.int(6) > 0
      await makeFill({ eventId: event.eventId, stationId, memberId: owner.memberId, vesselId, reasons: allowed ? [] : [{ code: 'TIER_CAP_EXCEEDED', message: 'Generated refusal' }] })
      c.fills.push({ heldOn: event.heldOn, allowed })
    }
    cases.push(c)
  }
}, 300_000)

interface MirrorRow {
  id: string
  effective_state: string
  last_proof_on: string | null
  rated_fill_bar: string | null
  fills_since_proof: number
  fills_remaining: number | null
  valid_through: string | null
  lapsed: boolean
}

/** The rule's answer from the case's own facts, as loadProofFacts would read them. */
function ruleAnswer(c: Case, today: string, policy = POLICY) {
  // The latest pass by day, then by entry (a later entry on the same day comes later in the list).
  const lastPass = c.passes.reduce<Case['passes'][number] | null>((best, p) => (!best || p.testedOn >= best.testedOn ? p : best), null)
  const events = lastPass
    ? c.events.filter((e): e is { kind: ProofInvalidatingEvent, on: string } => (PROOF_INVALIDATING_EVENTS as readonly string[]).includes(e.kind) && e.on > lastPass.testedOn)
    : []
  const fillsSinceProof = lastPass ? c.fills.filter(f => f.allowed && f.heldOn >= lastPass.testedOn).length : 0
  return deriveProofStanding({ state: c.state, construction: c.construction, lastLayupOn: null, proofRequestedAt: null, lastPass, events, fillsSinceProof }, policy, today)
}

describe('the proof standing\'s SQL mirror', () => {
  it('answers as deriveProofStanding for every generated vessel', async () => {
    const today = clubDay(0)
    const rows = await sql<MirrorRow>(
      `SELECT v.id, ps.effective_state, ps.last_proof_on::text AS last_proof_on, ps.rated_fill_bar, ps.fills_since_proof,
              ps.fills_remaining, ps.valid_through::text AS valid_through, ps.lapsed
         FROM vessels v ${proofStandingSql(POLICY, { today: '$1' })} WHERE v.club_id = $2`, [today, clubId])
    const byId = new Map(rows.map(r => [r.id, r]))
    expect(rows).toHaveLength(cases.length)
    for (const c of cases) {
      const want = ruleAnswer(c, today)
      const got = byId.get(c.vesselId)!
      const answer = {
        effectiveState: got.effective_state, lastProofOn: got.last_proof_on, ratedFillBar: got.rated_fill_bar === null ? null : Number(got.rated_fill_bar),
        fillsSinceProof: got.fills_since_proof, fillsRemaining: got.fills_remaining, validThroughOn: got.valid_through,
      }
      expect(answer, JSON.stringify(c)).toEqual({
        effectiveState: want.effectiveState, lastProofOn: want.lastProofOn, ratedFillBar: want.ratedFillBar,
        fillsSinceProof: want.fillsSinceProof, fillsRemaining: want.fillsRemaining, validThroughOn: want.validThroughOn,
      })
      expect(got.lapsed).toBe(c.state === 'in_service' && want.effectiveState === 'retest_due')
    }
    // The generated cases reach every way a proof stands: current, and lapsed by time, by count and by an event.
    const reasons = new Set(cases.flatMap(c => ruleAnswer(c, today).lapseReasons.map(r => r.code)))
    expect([...reasons].sort()).toEqual(['PROOF_FILL_LIMIT_REACHED', 'PROOF_INTERVAL_PASSED', 'PROOF_INVALIDATED'])
    expect(cases.some(c => ruleAnswer(c, today).effectiveState === 'in_service' && ruleAnswer(c, today).validThroughOn)).toBe(true)
  })

  // The desk reads the standing from the stored tally (last pass, fills since, first proof-ending event
  // after it, kept by triggers) with the policy applied on reading. After every kind of change the
  // tally's answer must still be the rule's, vessel by vessel.
  it('answers from the stored tally as deriveProofStanding, after passes, proof-ending events, fills and a policy change', async () => {
    const today = clubDay(0)
    interface TallyRow { id: string, in_service: boolean, last_pass_on: string, fills_since_pass: number, ends_on: string | null, valid_through: string, fills_remaining: number, lapsed: boolean }
    const compare = async (policy: VesselPolicyDto) => {
      const rows = await sql<TallyRow>(
        `SELECT v.id, t.in_service, t.last_pass_on::text AS last_pass_on, t.fills_since_pass, t.ends_on::text AS ends_on,
                ts.valid_through::text AS valid_through, ts.fills_remaining, ts.lapsed
           FROM vessel_proof_tallies t JOIN vessels v ON v.id = t.vessel_id ${tallyStandingSql(policy, { today: '$1' })} WHERE t.club_id = $2`, [today, clubId])
      const byId = new Map(rows.map(r => [r.id, r]))
      expect(rows).toHaveLength(cases.filter(c => c.passes.length).length)
      for (const c of cases) {
        const got = byId.get(c.vesselId)
        if (!c.passes.length) {
          expect(got).toBeUndefined()
          continue
        }
        const last = c.passes.reduce((a, p) => (p.testedOn > a ? p.testedOn : a), '')
        const firstEnding = c.events.filter(e => (PROOF_INVALIDATING_EVENTS as readonly string[]).includes(e.kind) && e.on > last)
          .map(e => e.on).sort()[0] ?? null
        expect({ inService: got!.in_service, lastPassOn: got!.last_pass_on, endsOn: got!.ends_on }, JSON.stringify(c))
          .toEqual({ inService: c.state === 'in_service', lastPassOn: last, endsOn: firstEnding })
        // The rule's answer for the vessel were it in service (the desk reads the tally for vessels in service only).
        const want = ruleAnswer({ ...c, state: 'in_service' }, today, policy)
        expect({ fillsSinceProof: got!.fills_since_pass, fillsRemaining: got!.fills_remaining, validThroughOn: got!.valid_through, lapsed: got!.lapsed }, JSON.stringify(c))
          .toEqual({ fillsSinceProof: want.fillsSinceProof, fillsRemaining: want.fillsRemaining, validThroughOn: want.validThroughOn, lapsed: want.effectiveState === 'retest_due' })
      }
      return new Map(rows.map(r => [r.id, r.lapsed]))
    }
    const g = generator(31)
    const before = await compare(POLICY)
    expect(new Set(before.values())).toEqual(new Set([true, false]))
    for (const [i, c] of cases.entries()) {
      const shape = i % 6
      if (shape === 0) {
        // A new pass in the last few days: the fills and events before it stop counting.
        const testedOn = clubDay(-g.int(3))
        await makeProofTest({ vesselId: c.vesselId, witnessId: officerId, testedOn, pressureBar: 15 })
        c.passes.push({ testedOn, ratedFillBar: 10 })
      }
      else if (shape === 1 && c.passes.length) {
        // A proof-ending event today, and one dated before the last pass (which ends nothing).
        for (const on of [clubDay(0), clubDay(-500)]) {
          const kind = g.pick(PROOF_INVALIDATING_EVENTS)
          await sql(`INSERT INTO vessel_events (club_id, vessel_id, kind, happened_on, reason, by_membership_id) VALUES ($1, $2, $3, $4, 'Later case', $5)`,
            [clubId, c.vesselId, kind, on, officerId])
          c.events.push({ kind, on })
        }
      }
      else if (shape === 2 && c.passes.length) {
        // Allowed fills at today's event until the limit is reached.
        const event = events.find(e => e.heldOn === clubDay(0))!
        for (let k = 0; k < 4; k++) {
          await makeFill({ eventId: event.eventId, stationId, memberId: ownerId, vesselId: c.vesselId })
          c.fills.push({ heldOn: event.heldOn, allowed: true })
        }
      }
    }
    const after = await compare(POLICY)
    // A vessel's construction (which picks the interval) and state change: the tally follows.
    for (const c of cases.filter(c => c.passes.length).slice(0, 6)) {
      c.construction = c.construction === 'other' ? 'single_bottle' : 'other'
      c.state = c.state === 'in_service' ? 'quarantined' : 'in_service'
      await sql(`UPDATE vessels SET construction = $2, state = $3 WHERE id = $1`, [c.vesselId, c.construction, c.state])
    }
    await compare(POLICY)

    // The changes moved standings both ways: renewed by a pass, ended by an event or by the fill count.
    const moved = (from: boolean) => [...after].filter(([id, lapsed]) => before.get(id) === from && lapsed !== from).length
    expect(moved(true)).toBeGreaterThan(0)
    expect(moved(false)).toBeGreaterThan(0)

    // The club changes its policy: the stored tally needs no refresh, the standing follows at once.
    const changed: VesselPolicyDto = { ...POLICY, intervalMonths: { single_bottle: 24, spliced_bottles: 1, overwrapped_liner: 2, mandrel_tube: 36, other: 5 }, fillLimit: { bottle: 9, laminate: 2 } }
    await sql(`UPDATE vessel_policies SET interval_months_single_bottle = $2, interval_months_spliced_bottles = $3, interval_months_overwrapped_liner = $4,
        interval_months_mandrel_tube = $5, interval_months_other = $6, fill_limit_bottle = $7, fill_limit_laminate = $8 WHERE club_id = $1`,
    [clubId, changed.intervalMonths.single_bottle, changed.intervalMonths.spliced_bottles, changed.intervalMonths.overwrapped_liner,
      changed.intervalMonths.mandrel_tube, changed.intervalMonths.other, changed.fillLimit.bottle, changed.fillLimit.laminate])
    const underChanged = await compare(changed)
    expect([...underChanged].some(([id, lapsed]) => after.get(id) !== lapsed)).toBe(true)
  })
})
