import { QueryTypes } from 'sequelize'
import { GAUGE_STATES, gaugeCurrentThrough, gaugeState } from '#shared/utils/event-rules'
import type { DeskTable } from '#shared/utils/audit-desk'
import { tallyStandingSql } from '../../vessels'
import { VESSEL_CONSTRUCTIONS } from '#shared/utils/vessel-arithmetic'
import { deskPolicy, type DeskContext } from './context'

/**
 * Where each desk table's rows come from. A SQL source is one SELECT whose columns are the table's
 * column keys (quoted) plus `id`, `link_kind`, `link_id`, `link_label`, `search`, `state` and `due_on`
 * (the day a windowed row falls due); the desk wraps it to filter, sort, page and count in the same
 * query. A computed source is a function (the gauge rule lives in TypeScript and is applied there;
 * the club's few stations make that cheap). The proof standing comes from the stored proof tally.
 */
export type DeskSource
  = | { kind: 'sql', sql: (ctx: DeskContext) => string, /** Reads the club's vessel policy (its context must carry it). */ policy?: true }
    | { kind: 'computed', rows: (ctx: DeskContext) => Promise<DeskSourceRow[]> }

/** One row as a source gives it. */
export interface DeskSourceRow {
  id: string
  link_kind: 'member' | 'vessel' | 'event' | 'station'
  link_id: string
  link_label: string
  search: string
  state: string | null
  due_on: string | null
  [column: string]: string | number | null
}

const TIER_NAME = `'T' || t.rank || ' ' || l.name`

/**
 * The membership `column` names has not resigned: against the club's few resigned memberships (a
 * hashed list from a partial index), so a count never reads every membership of the club.
 */
const NOT_RESIGNED = (column: string) =>
  `${column} NOT IN (SELECT x.id FROM memberships x WHERE x.club_id = :clubId AND x.resigned_at IS NOT NULL)`

/**
 * Members' latest passed, confirmed record of a course (fit tests only, or all but them) expiring by
 * `until`, not flagged for retraining: an index range of the stored latest pass per member and course
 * (`training_latest_passes`, kept by a trigger on the records: migration 0031), so neither a count nor
 * a page asks of each record whether a later pass supersedes it; the member's name is one probe of
 * `users` by the account the row carries (migration 0033).
 */
export function latestTrainingSql(fitTests: boolean | null, until = ':d90') {
  const course = fitTests === null ? '' : `AND c.code ${fitTests ? '=' : '<>'} 'respirator_fit'`
  return `
  SELECT p.record_id AS id, 'member' AS link_kind, p.membership_id::text AS link_id, u.name AS link_label,
         u.name AS "member", c.name AS "course", p.expires_on::text AS "expiresOn", (p.expires_on - CAST(:today AS date)) AS "daysLeft",
         u.name || ' ' || c.name AS search, NULL::text AS state, p.expires_on::text AS due_on, c.code AS course_code
    FROM training_latest_passes p JOIN courses c ON c.id = p.course_id LEFT JOIN users u ON u.id = p.user_id
   WHERE p.club_id = :clubId AND NOT p.retraining AND p.expires_on BETWEEN CAST(:today AS date) AND CAST(${until} AS date)
     AND ${NOT_RESIGNED('p.membership_id')} ${course}`
}

/**
 * Club vessels in service whose proof has lapsed or runs out by the parameter `until`, read from the
 * stored proof tally (`tallyStandingSql`: last pass, fills since, first proof-ending event) with the
 * club's policy applied. The tally's indexes pick the few that may: per construction, a last pass no
 * later than `until` less the interval plus three days (a month-end clamp moves a day by at most
 * three), a fill count at the smallest limit, or a proof-ending event by today; the exact standing is
 * then arithmetic on each row, and a count reads no other table (the joins for the names are LEFT
 * JOINs on keys, which the planner leaves out when nothing reads them).
 */
export function proofSql(ctx: DeskContext, until: string): string {
  const policy = deskPolicy(ctx)
  const smallestLimit = Math.min(policy.fillLimit.bottle, policy.fillLimit.laminate)
  const byTime = VESSEL_CONSTRUCTIONS.map(c => `(t.construction = '${c}' AND t.last_pass_on <= `
    + `(CAST(${until} AS date) - make_interval(months => ${Number(policy.intervalMonths[c])}))::date + 3)`).join(' OR ')
  return `
    SELECT t.vessel_id AS id, 'vessel' AS link_kind, v.tag AS link_id, v.tag AS link_label,
           v.tag AS "vessel", v.name AS "name", u.name AS "owner", ts.valid_through::text AS "validThrough",
           t.fills_since_pass AS "fillsSinceProof", ts.fills_remaining AS "fillsRemaining",
           v.tag || ' ' || v.name || ' ' || u.name AS search, CASE WHEN ts.lapsed THEN 'lapsed' ELSE 'lapsing' END AS state,
           CASE WHEN ts.lapsed THEN NULL ELSE ts.valid_through::text END AS due_on
      FROM vessel_proof_tallies t ${tallyStandingSql(policy, { today: ':today' })}
      LEFT JOIN vessels v ON v.id = t.vessel_id LEFT JOIN memberships m ON m.id = v.owner_membership_id LEFT JOIN users u ON u.id = m.user_id
     WHERE t.club_id = :clubId AND t.in_service AND (ts.lapsed OR ts.valid_through <= CAST(${until} AS date))
       AND (${byTime} OR t.fills_since_pass >= ${smallestLimit} OR t.ends_on <= CAST(:today AS date))`
}

export const DESK_SOURCES: Record<DeskTable, DeskSource> = {
  'tiers-expiring': { kind: 'sql', sql: () => `
    SELECT t.id, 'member' AS link_kind, t.membership_id::text AS link_id, u.name AS link_label,
           u.name AS "member", ${TIER_NAME} AS "tier", t.expires_on::text AS "expiresOn", (t.expires_on - CAST(:today AS date)) AS "daysLeft",
           u.name AS search, NULL::text AS state, t.expires_on::text AS due_on
      FROM member_tiers t LEFT JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
      LEFT JOIN memberships m ON m.id = t.membership_id LEFT JOIN users u ON u.id = m.user_id
     WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL AND t.suspended_at IS NULL AND t.revoked_at IS NULL AND ${NOT_RESIGNED('t.membership_id')}
       AND t.expires_on BETWEEN CAST(:today AS date) AND CAST(:d90 AS date)` },
  'training-expiring': { kind: 'sql', sql: () => latestTrainingSql(false) },
  'fit-tests-expiring': { kind: 'sql', sql: () => latestTrainingSql(true) },
  'tiers-lapsed': { kind: 'sql', sql: () => `
    SELECT t.id, 'member' AS link_kind, t.membership_id::text AS link_id, u.name AS link_label,
           u.name AS "member", ${TIER_NAME} AS "tier",
           CASE WHEN t.suspended_at IS NOT NULL THEN to_char(t.suspended_at AT TIME ZONE :tz, 'YYYY-MM-DD') ELSE (t.expires_on + 1)::text END AS "since",
           t.suspension_reason AS "reason",
           u.name AS search, CASE WHEN t.suspended_at IS NOT NULL THEN 'suspended' ELSE 'lapsed' END AS state, NULL::text AS due_on
      FROM member_tiers t LEFT JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
      LEFT JOIN memberships m ON m.id = t.membership_id LEFT JOIN users u ON u.id = m.user_id
     WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL AND t.revoked_at IS NULL AND ${NOT_RESIGNED('t.membership_id')}
       AND (t.suspended_at IS NOT NULL OR t.expires_on < CAST(:today AS date))` },
  // The member's last allowed fill (one index probe each), then their tiers that were in force at it and
  // are not now, when no tier as high is current: the fill gate will refuse them at that tier. The
  // highest current tier is a scalar subquery, so each candidate costs one probe of (membership, rank).
  'refused-next': { kind: 'sql', sql: () => `
    SELECT t.id, 'member' AS link_kind, t.membership_id::text AS link_id, u.name AS link_label,
           u.name AS "member", ${TIER_NAME} AS "tier",
           CASE WHEN t.suspended_at IS NOT NULL THEN to_char(t.suspended_at AT TIME ZONE :tz, 'YYYY-MM-DD') ELSE (t.expires_on + 1)::text END AS "since",
           lf.held_on::text AS "lastFillOn",
           u.name AS search, CASE WHEN t.suspended_at IS NOT NULL THEN 'suspended' ELSE 'lapsed' END AS state, NULL::text AS due_on
      FROM member_tiers t LEFT JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
      LEFT JOIN memberships m ON m.id = t.membership_id LEFT JOIN users u ON u.id = m.user_id
      CROSS JOIN LATERAL (SELECT f.created_at, f.held_on FROM fills f WHERE f.membership_id = t.membership_id AND f.allowed
                           ORDER BY f.created_at DESC LIMIT 1) lf
     WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL AND t.revoked_at IS NULL AND ${NOT_RESIGNED('t.membership_id')}
       AND (t.suspended_at IS NOT NULL OR t.expires_on < CAST(:today AS date))
       AND (t.suspended_at > lf.created_at OR (t.suspended_at IS NULL AND t.expires_on >= lf.held_on))
       AND coalesce((SELECT max(c.rank) FROM member_tiers c WHERE c.membership_id = t.membership_id AND c.id <> t.id
                      AND c.confirmed_at IS NOT NULL AND c.suspended_at IS NULL AND c.revoked_at IS NULL AND c.expires_on >= CAST(:today AS date)), -1) < t.rank` },
  'proofs': { kind: 'sql', sql: ctx => proofSql(ctx, ':d90'), policy: true },
  'vessels-held': { kind: 'sql', sql: () => `
    SELECT v.id, 'vessel' AS link_kind, v.tag AS link_id, v.tag AS link_label,
           v.tag AS "vessel", v.name AS "name", u.name AS "owner", to_char(v.updated_at AT TIME ZONE :tz, 'YYYY-MM-DD') AS "since",
           v.tag || ' ' || v.name || ' ' || u.name AS search, v.state AS state, NULL::text AS due_on
      FROM vessels v LEFT JOIN memberships m ON m.id = v.owner_membership_id LEFT JOIN users u ON u.id = m.user_id
     WHERE v.club_id = :clubId AND v.state IN ('quarantined', 'failed')` },
  'gauges': { kind: 'computed', rows: async (ctx) => {
    const stations = await useDb().query<{ id: string, name: string, gauge_name: string, calibrated_on: string, interval_months: number }>(
      `SELECT id, name, gauge_name, gauge_calibrated_on::text AS calibrated_on, gauge_interval_months AS interval_months
         FROM fill_stations WHERE club_id = :clubId AND retired_at IS NULL`,
      { replacements: { clubId: ctx.clubId }, type: QueryTypes.SELECT })
    return stations.flatMap((s) => {
      const through = gaugeCurrentThrough(s.calibrated_on, s.interval_months)
      const state = gaugeState(through, ctx.today)
      if (state === GAUGE_STATES[0]) return []
      return [{
        id: s.id, link_kind: 'station' as const, link_id: s.id, link_label: s.name, search: `${s.name} ${s.gauge_name}`, state, due_on: null,
        station: s.name, gauge: s.gauge_name, calibratedOn: s.calibrated_on, currentThrough: through,
      }]
    })
  } },
  // From the running tallies the fill log's trigger keeps (no count over the whole log per request).
  'event-fills': { kind: 'sql', sql: () => `
    SELECT e.id, 'event' AS link_kind, e.id::text AS link_id, e.site AS link_label,
           e.held_on::text AS "heldOn", e.site AS "site", t.fills AS "fills", t.refused AS "refused", t.supervised AS "supervised",
           e.site AS search, NULL::text AS state, NULL::text AS due_on
      FROM launch_event_fill_tallies t JOIN launch_events e ON e.id = t.event_id
     WHERE t.club_id = :clubId` },
  'incidents': { kind: 'sql', sql: ctx => `
    SELECT i.id, CASE WHEN v.tag IS NOT NULL THEN 'vessel' WHEN i.event_id IS NOT NULL THEN 'event' ELSE 'member' END AS link_kind,
           coalesce(v.tag, i.event_id::text, i.reported_by_membership_id::text) AS link_id, coalesce(v.tag, e.site, ru.name) AS link_label,
           to_char(i.happened_at AT TIME ZONE :tz, 'YYYY-MM-DD HH24:MI') AS "happenedAt", i.place AS "place", v.tag AS "vessel",
           ru.name AS "reporter", (SELECT count(*)::int FROM incident_people p WHERE p.incident_id = i.id) AS "people",
           ${ctx.officer ? 'i.injury_details' : 'NULL::text'} AS "injuryDetails",
           i.place || ' ' || coalesce(v.tag, '') AS search, i.kind AS state, NULL::text AS due_on
      FROM incidents i LEFT JOIN memberships rm ON rm.id = i.reported_by_membership_id LEFT JOIN users ru ON ru.id = rm.user_id
      LEFT JOIN vessels v ON v.id = i.vessel_id LEFT JOIN launch_events e ON e.id = i.event_id
     WHERE i.club_id = :clubId AND i.status = 'open'` },
}
