import type { VesselPolicyDto } from '#shared/types/proof-tests'
import { PROOF_INVALIDATING_EVENTS, VESSEL_CONSTRUCTIONS, constructionFamily } from '#shared/utils/vessel-arithmetic'

/** A whole number of the policy written into a statement (never text a person typed). */
function policyInteger(n: number): string {
  if (!Number.isInteger(n)) throw new Error(`Not a whole number of the vessel policy: ${n}`)
  return String(n)
}

/** `CASE v.construction WHEN … THEN n … END` of one policy figure per construction. */
function byConstruction(figure: (c: typeof VESSEL_CONSTRUCTIONS[number]) => number): string {
  return `CASE v.construction ${VESSEL_CONSTRUCTIONS.map(c => `WHEN '${c}' THEN ${policyInteger(figure(c))}`).join(' ')} END`
}

/**
 * The SQL mirror of `deriveProofStanding()` in standing.ts, with the facts `loadProofFacts()` reads,
 * over `vessels v` under the club's `policy` (the figures `policyIntervalMonths`/`policyFillLimit` pick) — the one copy; keep it in step
 * (tests/api/vessels/standing-sql.test.ts feeds both the same generated vessels and compares every
 * answer). A `LEFT JOIN LATERAL … ps` to append after `FROM vessels v`, giving `ps.effective_state`,
 * `ps.last_proof_on`, `ps.rated_fill_bar`, `ps.fills_since_proof`, `ps.fills_remaining`,
 * `ps.valid_through` and `ps.lapsed` (an in-service vessel whose proof has lapsed: interval passed,
 * fill limit reached, or a proof-ending event after the test and by today). As there: the last pass
 * is the latest by test day then by entry; only allowed fills at events held on or after the test
 * day count; the interval runs in calendar months, clamped at a month's end (PostgreSQL's date +
 * interval does the same). `today` names the query's parameter, e.g. `:today`.
 */
export function proofStandingSql(policy: VesselPolicyDto, p: { today: string }): string {
  const today = `CAST(${p.today} AS date)`
  const kinds = PROOF_INVALIDATING_EVENTS.map(k => `'${k}'`).join(', ')
  return `
    LEFT JOIN LATERAL (
      SELECT lp.tested_on, lp.rated_fill_bar, fc.n, r.valid_through, r.fill_limit,
             (${today} > r.valid_through OR fc.n >= r.fill_limit
              OR EXISTS (SELECT 1 FROM vessel_events e WHERE e.vessel_id = v.id AND e.kind IN (${kinds})
                          AND e.happened_on > lp.tested_on AND e.happened_on <= ${today})) AS lapsed
        FROM (SELECT pt.tested_on, pt.rated_fill_bar FROM proof_tests pt WHERE pt.vessel_id = v.id AND pt.result = 'pass'
               ORDER BY pt.tested_on DESC, pt.created_at DESC LIMIT 1) lp
       CROSS JOIN LATERAL (SELECT count(*)::int AS n FROM fills f WHERE f.vessel_id = v.id AND f.allowed AND f.held_on >= lp.tested_on) fc
       CROSS JOIN LATERAL (SELECT (lp.tested_on + make_interval(months => ${byConstruction(c => policy.intervalMonths[c])}))::date AS valid_through,
                                  ${byConstruction(c => policy.fillLimit[constructionFamily(c)])} AS fill_limit) r
    ) pf ON true
    CROSS JOIN LATERAL (
      SELECT CASE WHEN v.state = 'in_service' AND pf.lapsed THEN 'retest_due' ELSE v.state END AS effective_state,
             pf.tested_on AS last_proof_on,
             CASE WHEN v.state = 'in_service' AND NOT pf.lapsed THEN pf.rated_fill_bar END AS rated_fill_bar,
             coalesce(pf.n, 0) AS fills_since_proof,
             CASE WHEN v.state = 'in_service' AND pf.tested_on IS NOT NULL THEN greatest(0, pf.fill_limit - pf.n) END AS fills_remaining,
             CASE WHEN v.state = 'in_service' THEN pf.valid_through END AS valid_through,
             (v.state = 'in_service' AND coalesce(pf.lapsed, false)) AS lapsed
    ) ps`
}
