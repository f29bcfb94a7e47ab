import { QueryTypes } from 'sequelize'
import type { Actor } from '../../../utils/auth'
import type { DeskChartsDto, DeskEventTiersDto, DeskExpiryWeekDto } from '#shared/types/audit-desk'
import { DESK_CHART_EVENTS, DESK_CHART_WEEKS, deskWeekOf } from '#shared/utils/audit-desk'
import { addCalendarDays } from '#shared/utils/dates'
import { deskContext } from './context'
import { latestTrainingSql, proofSql } from './sources'

/**
 * The desk's charts: what falls due in each of the next 26 weeks (tiers in force, members' latest
 * passed training records and fit tests, proofs of vessels in service), and the allowed fills of the
 * last events with fills by the tier each fill was made at (the filler's highest valid tier).
 */
export async function deskCharts(actor: Actor): Promise<DeskChartsDto> {
  const ctx = await deskContext(actor, { policy: true })
  const until = addCalendarDays(ctx.today, DESK_CHART_WEEKS * 7 - 1)
  const db = useDb()
  const replacements = { ...ctx.replacements, until, events: DESK_CHART_EVENTS }
  const [dated, fillRows] = await Promise.all([
    // Counted per kind and day by the database (at most 4 × 182 rows); the week is the shared rule's.
    db.query<{ kind: 'tiers' | 'training' | 'fitTests' | 'proofs', due: string, n: number }>(
      `SELECT kind, due, count(*)::int AS n FROM (
       SELECT 'tiers' AS kind, t.expires_on::text AS due FROM member_tiers t JOIN memberships m ON m.id = t.membership_id
        WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL AND t.suspended_at IS NULL AND t.revoked_at IS NULL AND m.resigned_at IS NULL
          AND t.expires_on BETWEEN CAST(:today AS date) AND CAST(:until AS date)
       UNION ALL
       SELECT CASE WHEN t.course_code = 'respirator_fit' THEN 'fitTests' ELSE 'training' END, t.due_on FROM (${latestTrainingSql(null, ':until')}) t
       UNION ALL
       SELECT 'proofs', p.due_on FROM (${proofSql(ctx, ':until')}) p WHERE p.state = 'lapsing') d GROUP BY kind, due`,
      { replacements, type: QueryTypes.SELECT }),
    // The running tally per event and tier (kept by a trigger on the fill log).
    db.query<{ event_id: string, held_on: string, site: string, rank: number | null, n: number }>(
      `WITH ev AS (SELECT e.id, e.held_on, e.site FROM launch_events e JOIN launch_event_fill_tallies t ON t.event_id = e.id
                    WHERE e.club_id = :clubId AND e.held_on <= CAST(:today AS date)
                    ORDER BY e.held_on DESC, e.id LIMIT :events)
       SELECT ev.id AS event_id, ev.held_on::text AS held_on, ev.site, t.tier_rank AS rank, t.fills AS n
         FROM ev LEFT JOIN launch_event_tier_fills t ON t.event_id = ev.id`,
      { replacements, type: QueryTypes.SELECT }),
  ])
  const weeks: DeskExpiryWeekDto[] = Array.from({ length: DESK_CHART_WEEKS }, (_, i) => ({
    start: addCalendarDays(ctx.today, i * 7), tiers: 0, training: 0, fitTests: 0, proofs: 0,
  }))
  for (const d of dated) {
    const w = deskWeekOf(d.due, ctx.today)
    if (w !== null) weeks[w]![d.kind] += d.n
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
