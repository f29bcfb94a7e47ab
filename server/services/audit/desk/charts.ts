import { QueryTypes } from 'sequelize'
import type { Actor } from '../../../utils/auth'
import type { DeskChartsDto, DeskEventTiersDto, DeskExpiryWeekDto } from '#shared/types/audit-desk'
import { DESK_CHART_EVENTS, DESK_CHART_WEEKS, deskWeekOf } from '#shared/utils/audit-desk'
import { addCalendarDays } from '#shared/utils/dates'
import { deskContext, type DeskContext } from './context'
import { proofRows } from './sources'
import { deskCached } from './cache'

/**
 * The desk's charts: what falls due in each of the next 26 weeks (tiers in force, members' latest
 * passed training records and fit tests, proofs of vessels in service), and the allowed fills of the
 * last events with fills by the filler's highest tier in force on the event's day.
 */
export async function deskCharts(actor: Actor): Promise<DeskChartsDto> {
  const ctx = await deskContext(actor)
  return deskCached(`${ctx.clubId}:${ctx.today}:charts`, () => computeCharts(ctx))
}

async function computeCharts(ctx: DeskContext): Promise<DeskChartsDto> {
  const until = addCalendarDays(ctx.today, DESK_CHART_WEEKS * 7 - 1)
  const db = useDb()
  const replacements = { ...ctx.replacements, until, events: DESK_CHART_EVENTS }
  const [dated, fillRows, proofs] = await Promise.all([
    db.query<{ kind: 'tiers' | 'training' | 'fitTests', due: string }>(
      `SELECT 'tiers' AS kind, t.expires_on::text AS due FROM member_tiers t JOIN memberships m ON m.id = t.membership_id
        WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL AND t.suspended_at IS NULL AND t.revoked_at IS NULL AND m.resigned_at IS NULL
          AND t.expires_on BETWEEN CAST(:today AS date) AND CAST(:until AS date)
       UNION ALL
       SELECT CASE WHEN c.code = 'respirator_fit' THEN 'fitTests' ELSE 'training' END, r.expires_on::text
         FROM (SELECT DISTINCT ON (membership_id, course_id) * FROM training_records
                WHERE club_id = :clubId AND result = 'pass' AND confirmed_at IS NOT NULL ORDER BY membership_id, course_id, trained_to DESC, created_at DESC) r
         JOIN courses c ON c.id = r.course_id JOIN memberships m ON m.id = r.membership_id
        WHERE r.retraining_required_at IS NULL AND m.resigned_at IS NULL
          AND r.expires_on BETWEEN CAST(:today AS date) AND CAST(:until AS date)`,
      { replacements, type: QueryTypes.SELECT }),
    // Fills grouped by member first, so each member's tier on the day is looked up once per event.
    db.query<{ event_id: string, held_on: string, site: string, rank: number | null, n: number }>(
      `WITH ev AS (SELECT e.id, e.held_on, e.site FROM launch_events e
                    WHERE e.club_id = :clubId AND e.held_on <= CAST(:today AS date) AND EXISTS (SELECT 1 FROM fills f WHERE f.event_id = e.id)
                    ORDER BY e.held_on DESC, e.id LIMIT :events),
            per AS (SELECT f.event_id, f.membership_id, count(*)::int AS n FROM fills f JOIN ev ON ev.id = f.event_id
                     WHERE f.allowed GROUP BY f.event_id, f.membership_id)
       SELECT ev.id AS event_id, ev.held_on::text AS held_on, ev.site, tr.rank, sum(per.n)::int AS n
         FROM ev LEFT JOIN per ON per.event_id = ev.id
         LEFT JOIN LATERAL (SELECT max(t.rank) AS rank FROM member_tiers t WHERE t.membership_id = per.membership_id
                             AND t.first_granted_on <= ev.held_on AND t.expires_on >= ev.held_on AND t.revoked_at IS NULL AND t.confirmed_at IS NOT NULL) tr ON true
        GROUP BY ev.id, ev.held_on, ev.site, tr.rank`,
      { replacements, type: QueryTypes.SELECT }),
    proofRows(ctx, until),
  ])
  const weeks: DeskExpiryWeekDto[] = Array.from({ length: DESK_CHART_WEEKS }, (_, i) => ({
    start: addCalendarDays(ctx.today, i * 7), tiers: 0, training: 0, fitTests: 0, proofs: 0,
  }))
  for (const d of dated) {
    const w = deskWeekOf(d.due, ctx.today)
    if (w !== null) weeks[w]![d.kind]++
  }
  for (const p of proofs) {
    const w = p.due_on ? deskWeekOf(p.due_on, ctx.today) : null
    if (w !== null) weeks[w]!.proofs++
  }
  const events = new Map<string, DeskEventTiersDto>()
  for (const r of fillRows) {
    const e = events.get(r.event_id) ?? { eventId: r.event_id, heldOn: r.held_on, site: r.site, byRank: [0, 0, 0, 0, 0], none: 0 }
    events.set(r.event_id, e)
    if (!r.n) continue
    if (r.rank === null) e.none += r.n
    else e.byRank[r.rank]! += r.n
  }
  return { today: ctx.today, weeks, events: [...events.values()].sort((a, b) => a.heldOn.localeCompare(b.heldOn)) }
}
