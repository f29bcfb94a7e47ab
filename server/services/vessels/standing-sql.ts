import type { VesselPolicyDto } from '#shared/types/proof-tests'
import { PROOF_INVALIDATING_EVENTS, VESSEL_CONSTRUCTIONS, constructionFamily } from '#shared/utils/vessel-arithmetic'

/** A whole number of the policy written into a statement (never text a person typed). */
function policyInteger(n: number): string {
  if (!Number.isInteger(n)) throw new Error(`Not a whole number of the vessel policy: ${n}`)
  return String(n)
}

/** `CASE v.construction WHEN … THEN n … END` of one policy figure per construction. */
function byConstruction(figure: (c: typeof VESSEL_CONSTRUCTIONS[number]) => number, column = 'v.construction'): string {
  return `CASE ${column} ${VESSEL_CONSTRUCTIONS.map(c => `WHEN '${c}' THEN ${policyInteger(figure(c))}`).join(' ')} END`
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

/**
 * The proof standing read from the stored tally instead of re-derived: `vessel_proof_tallies t` keeps
 * a vessel's last pass day, the allowed fills at events held on or after it, the first proof-ending
 * event dated after it (`ends_on`), its construction and whether it is in service, kept by triggers on
 * the proof tests, fills, vessel events and vessels (migrations 0027, 0028); the club's `policy`
 * (interval and fill limit by construction) is applied here, so a policy change needs no refresh. A
 * `CROSS JOIN LATERAL … ts` to append after `vessel_proof_tallies t`, giving `ts.valid_through`,
 * `ts.fill_limit`, `ts.fills_remaining` and `ts.lapsed` (interval passed, fill limit reached, or a
 * proof-ending event by today) for a vessel in service (`t.in_service`) — as `proofStandingSql`
 * answers (tests/api/vessels/standing-sql.test.ts compares both with the rule). `today` names the parameter.
 */
export function tallyStandingSql(policy: VesselPolicyDto, p: { today: string }): string {
  const today = `CAST(${p.today} AS date)`
  return `
    CROSS JOIN LATERAL (SELECT (t.last_pass_on + make_interval(months => ${byConstruction(c => policy.intervalMonths[c], 't.construction')}))::date AS valid_through,
                               ${byConstruction(c => policy.fillLimit[constructionFamily(c)], 't.construction')} AS fill_limit) tr
    CROSS JOIN LATERAL (SELECT tr.valid_through, tr.fill_limit, greatest(0, tr.fill_limit - t.fills_since_pass) AS fills_remaining,
                               (${today} > tr.valid_through OR t.fills_since_pass >= tr.fill_limit OR coalesce(t.ends_on <= ${today}, false)) AS lapsed) ts`
}
