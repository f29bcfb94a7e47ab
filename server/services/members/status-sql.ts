import type { MembershipStatus } from '#shared/utils/membership-status'

/**
 * The SQL mirror of `membershipStatus()` in shared/utils/membership-status.ts, over `memberships m`
 * — the one copy; keep it in step (tests/api/members/directory.test.ts and dashboard/dashboard.test.ts check they agree
 * for every status and at the grace boundaries). Precedence as there: suspended > resigned >
 * pending (never paid) > active (paid through today or later) > grace (paid_through >= today - grace
 * days) > lapsed. Each predicate is a plain range on `paid_through`, so the (club_id, paid_through)
 * index serves it. `today` and `graceDays` name the query's parameters, e.g. `$today` or `:today`.
 */
export function statusPredicates(p: { today: string, graceDays: string }): Record<MembershipStatus, string> {
  const standing = 'm.suspended_at IS NULL AND m.resigned_at IS NULL'
  const graceFrom = `(CAST(${p.today} AS date) - CAST(${p.graceDays} AS integer))`
  return {
    suspended: 'm.suspended_at IS NOT NULL',
    resigned: 'm.suspended_at IS NULL AND m.resigned_at IS NOT NULL',
    pending: `${standing} AND m.paid_through IS NULL`,
    active: `${standing} AND m.paid_through >= CAST(${p.today} AS date)`,
    grace: `${standing} AND m.paid_through < CAST(${p.today} AS date) AND m.paid_through >= ${graceFrom}`,
    lapsed: `${standing} AND m.paid_through < ${graceFrom}`,
  }
}

/** The status as one SQL expression (`CASE … END`), for grouping and counting. */
export function statusCaseSql(p: { today: string, graceDays: string }): string {
  const predicates = statusPredicates(p)
  const order: MembershipStatus[] = ['suspended', 'resigned', 'pending', 'active', 'grace', 'lapsed']
  return `CASE ${order.map(s => `WHEN ${predicates[s]} THEN '${s}'`).join(' ')} END`
}

/**
 * One count per status as `count(*) FILTER (WHERE …) AS <status>` columns, for a single-row tally:
 * plain range tests per column cost about a third of evaluating and grouping by the CASE expression.
 */
export function statusCountColumnsSql(p: { today: string, graceDays: string }): string {
  const predicates = statusPredicates(p)
  return (Object.keys(predicates) as MembershipStatus[])
    .map(s => `count(*) FILTER (WHERE ${predicates[s]})::int AS ${s}`).join(', ')
}
