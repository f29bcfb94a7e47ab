import { QueryTypes, type Transaction } from 'sequelize'
import type { VesselPolicyDto } from '#shared/types/proof-tests'
import type { VesselProofStandingDto } from '#shared/types/vessels'
import type { VesselState } from '#shared/utils/vessel-states'
import { PROOF_INVALIDATING_EVENTS, earliestProofDate, proofStanding, type ProofInvalidatingEvent, type VesselConstruction } from '#shared/utils/vessel-arithmetic'
import { policyFillLimit, policyIntervalMonths } from './policy'

/**
 * The fills recorded for each vessel since its last passed proof (`since`, YYYY-MM-DD: fills at events
 * held on or after that day), by vessel id, in one query. Only allowed fills count; refused attempts
 * never do. This is the one place the proof standing, the lapsing filter and the notices take the count from.
 */
export async function fillsSinceProof(proofs: readonly { vesselId: string, since: string }[], transaction?: Transaction): Promise<Map<string, number>> {
  const counts = new Map(proofs.map(p => [p.vesselId, 0]))
  if (!proofs.length) return counts
  const rows = await useDb().query<{ vessel_id: string, n: number }>(
    `SELECT f.vessel_id, count(*)::int AS n
       FROM unnest(ARRAY[:ids]::uuid[], ARRAY[:since]::date[]) AS p(vessel_id, since)
       JOIN fills f ON f.vessel_id = p.vessel_id AND f.allowed AND f.held_on >= p.since
      GROUP BY f.vessel_id`,
    { replacements: { ids: proofs.map(p => p.vesselId), since: proofs.map(p => p.since) }, type: QueryTypes.SELECT, transaction })
  for (const r of rows) counts.set(r.vessel_id, r.n)
  return counts
}

/** What the standing of one vessel is derived from: its stored state and its last passed proof. */
export interface StandingFacts {
  state: VesselState
  construction: VesselConstruction
  lastLayupOn: string | null
  proofRequestedAt: Date | null
  lastPass: { testedOn: string, ratedFillBar: number } | null
  /** Events that end a proof, dated after the last pass. */
  events: { kind: ProofInvalidatingEvent, on: string }[]
  fillsSinceProof: number
}

/**
 * Where a vessel stands with its proof on the club's `today` under `policy`: an in-service vessel
 * whose proof has lapsed (interval, fill count or an event) is `retest_due` and has no rated fill in
 * force; the cure clock counts from the last layup with the club's cure wait.
 */
export function deriveProofStanding(f: StandingFacts, policy: VesselPolicyDto, today: string): VesselProofStandingDto {
  const earliestProofOn = f.lastLayupOn ? earliestProofDate(f.lastLayupOn, policy.cureWaitDays) : null
  const proofRequestedAt = f.proofRequestedAt ? f.proofRequestedAt.toISOString() : null
  const standing = f.lastPass && (f.state === 'in_service' || f.state === 'awaiting_proof')
    ? proofStanding({
        testedOn: f.lastPass.testedOn,
        construction: f.construction,
        fillsSinceProof: f.fillsSinceProof,
        events: f.events,
        today,
        intervalMonths: policyIntervalMonths(policy, f.construction),
        fillLimit: policyFillLimit(policy, f.construction),
      })
    : null
  const inService = f.state === 'in_service'
  const effectiveState = inService && standing?.lapsed ? 'retest_due' : f.state
  return {
    effectiveState,
    ratedFillBar: effectiveState === 'in_service' ? f.lastPass?.ratedFillBar ?? null : null,
    lastProofOn: f.lastPass?.testedOn ?? null,
    fillsSinceProof: f.lastPass ? f.fillsSinceProof : 0,
    fillsRemaining: inService && standing ? standing.fillsRemaining : null,
    validThroughOn: inService && standing ? standing.validThroughDate : null,
    lapseReasons: standing?.reasons ?? [],
    earliestProofOn,
    proofRequestedAt,
  }
}

interface ProofFactsRow {
  vessel_id: string
  tested_on: string | null
  rated_fill_bar: string | null
  events: { kind: ProofInvalidatingEvent, on: string }[] | null
}

/**
 * The last passed proof of each vessel in `vesselIds` and the proof-ending events dated after it,
 * with the fill count since, in two queries whatever the number of vessels.
 */
export async function loadProofFacts(vesselIds: readonly string[], transaction?: Transaction): Promise<Map<string, Pick<StandingFacts, 'lastPass' | 'events' | 'fillsSinceProof'>>> {
  const facts = new Map<string, Pick<StandingFacts, 'lastPass' | 'events' | 'fillsSinceProof'>>()
  if (!vesselIds.length) return facts
  const rows = await useDb().query<ProofFactsRow>(
    `SELECT v.id AS vessel_id, lp.tested_on::text AS tested_on, lp.rated_fill_bar,
      (SELECT json_agg(json_build_object('kind', e.kind, 'on', e.happened_on::text) ORDER BY e.happened_on)
        FROM vessel_events e WHERE e.vessel_id = v.id AND e.kind IN (:kinds) AND e.happened_on > lp.tested_on) AS events
    FROM vessels v
    LEFT JOIN LATERAL (SELECT p.tested_on, p.rated_fill_bar FROM proof_tests p
      WHERE p.vessel_id = v.id AND p.result = 'pass' ORDER BY p.tested_on DESC, p.created_at DESC LIMIT 1) lp ON true
    WHERE v.id IN (:ids)`,
    { replacements: { ids: [...vesselIds], kinds: [...PROOF_INVALIDATING_EVENTS] }, type: QueryTypes.SELECT, transaction })
  const fills = await fillsSinceProof(rows.filter(r => r.tested_on).map(r => ({ vesselId: r.vessel_id, since: r.tested_on! })), transaction)
  for (const r of rows) {
    facts.set(r.vessel_id, {
      lastPass: r.tested_on ? { testedOn: r.tested_on, ratedFillBar: Number(r.rated_fill_bar) } : null,
      events: r.events ?? [],
      fillsSinceProof: fills.get(r.vessel_id) ?? 0,
    })
  }
  return facts
}
