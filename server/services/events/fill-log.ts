import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import type { FillLogQuery, MyFillsQuery } from '#shared/schemas/events'
import type { FillLogRowDto, MyFillDto } from '#shared/types/events'
import type { Paged } from '#shared/types/common'
import type { FillReason, LimitingFactor } from '#shared/utils/fill-reasons'
import { LIMITING_FACTOR_WORDS } from '#shared/utils/fill-reasons'
import type { CsvValue } from '#shared/utils/csv'

interface FillLogRow {
  id: string
  created_at: Date
  held_on: string
  membership_id: string
  member_name: string
  vessel_tag: string
  station_name: string
  pressure_bar: number
  entered_pressure: number
  entered_unit: string
  water_volume_l: string
  allowed: boolean
  reasons: FillReason[]
  permitted_max_bar: number
  limiting_factor: LimitingFactor
  minimum_distance_m: number
  recorded_by_name: string
  supervisor_name: string | null
  total: number
}

// Sort keys → columns; the fill's id breaks ties so a page never repeats or skips a row.
const SORT_COLUMNS: Record<FillLogQuery['sort'], string> = {
  createdAt: 'f.created_at', member: 'mu.name', vessel: 'v.tag', pressure: 'f.pressure_bar', outcome: 'f.allowed',
}

/** 404 unless event `id` is one of the actor's club's. */
async function requireClubEvent(actor: Actor, id: string): Promise<void> {
  const [row] = await useDb().query('SELECT 1 FROM launch_events WHERE id = :id AND club_id = :clubId',
    { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!row) notFound('No such event')
}

/**
 * Event `id`'s fills and refused attempts, filtered by outcome, sorted and paged by the server (every
 * row with `all`, for the CSV). 404 when the event is not the actor's club's.
 */
export async function eventFillLog(actor: Actor, id: string, query: FillLogQuery, opts: { all?: boolean } = {}): Promise<Paged<FillLogRowDto>> {
  await requireClubEvent(actor, id)
  const outcome = query.outcome === undefined ? '' : `AND f.allowed = ${query.outcome === 'allowed'}`
  const rows = await useDb().query<FillLogRow>(
    `SELECT count(*) OVER ()::int AS total, f.id, f.created_at, f.held_on::text AS held_on, f.membership_id, mu.name AS member_name,
        v.tag AS vessel_tag, s.name AS station_name, f.pressure_bar, f.entered_pressure, f.entered_unit, f.water_volume_l, f.allowed,
        f.reasons, f.permitted_max_bar, f.limiting_factor, f.minimum_distance_m, ru.name AS recorded_by_name, su.name AS supervisor_name
      FROM fills f
      JOIN memberships mm ON mm.id = f.membership_id JOIN users mu ON mu.id = mm.user_id
      JOIN vessels v ON v.id = f.vessel_id
      JOIN fill_stations s ON s.id = f.station_id
      JOIN memberships rm ON rm.id = f.recorded_by_membership_id JOIN users ru ON ru.id = rm.user_id
      LEFT JOIN memberships sm ON sm.id = f.supervisor_membership_id LEFT JOIN users su ON su.id = sm.user_id
     WHERE f.event_id = :id AND f.club_id = :clubId ${outcome}
     ORDER BY ${SORT_COLUMNS[query.sort]} ${query.dir === 'desc' ? 'DESC' : 'ASC'}, f.id
     ${opts.all ? '' : 'LIMIT :limit OFFSET :offset'}`,
    { replacements: { id, clubId: actor.club.id, limit: query.pageSize, offset: (query.page - 1) * query.pageSize }, type: QueryTypes.SELECT })
  return {
    items: rows.map(r => ({
      id: r.id, recordedAt: new Date(r.created_at).toISOString(), heldOn: r.held_on, member: { id: r.membership_id, name: r.member_name },
      vesselTag: r.vessel_tag, stationName: r.station_name, pressureBar: r.pressure_bar, enteredPressure: r.entered_pressure,
      enteredUnit: r.entered_unit, waterVolumeL: Number(r.water_volume_l), allowed: r.allowed, reasons: r.reasons,
      permittedMaxBar: r.permitted_max_bar, limitingFactor: r.limiting_factor, minimumDistanceM: r.minimum_distance_m,
      recordedByName: r.recorded_by_name, supervisorName: r.supervisor_name,
    })),
    page: query.page, pageSize: query.pageSize, total: rows[0]?.total ?? 0,
  }
}

/** Every fill and refused attempt of event `id` the filter selects, as CSV rows under `EVENT_FILL_CSV_HEADER` (pressures with their fixed decimals, read as numbers). */
export async function eventFillLogRows(actor: Actor, id: string, query: FillLogQuery): Promise<CsvValue[][]> {
  const { items } = await eventFillLog(actor, id, query, { all: true })
  return items.map(f => [
    f.recordedAt, f.heldOn, f.member.name, f.vesselTag, f.stationName, f.pressureBar.toFixed(2), `${f.enteredPressure} ${f.enteredUnit}`,
    f.waterVolumeL, f.allowed ? 'allowed' : 'refused', f.reasons.map(r => r.code).join(' '),
    (Math.floor(f.permittedMaxBar * 10 + 1e-9) / 10).toFixed(1), LIMITING_FACTOR_WORDS[f.limitingFactor].label,
    Math.ceil(f.minimumDistanceM), f.recordedByName, f.supervisorName,
  ])
}

/** The event fill log CSV's columns. */
export const EVENT_FILL_CSV_HEADER = ['recorded_at', 'held_on', 'member', 'vessel', 'station', 'pressure_bar', 'entered', 'water_l', 'outcome', 'reasons',
  'permitted_max_bar', 'limited_by', 'standoff_m', 'recorded_by', 'supervisor'] as const

/** The signed-in member's own fills and refused attempts, newest first, a page at a time. */
export async function myFills(actor: Actor, query: MyFillsQuery): Promise<Paged<MyFillDto>> {
  const rows = await useDb().query<{ total: number, id: string, created_at: Date, held_on: string, event_id: string, site: string, tag: string, pressure_bar: number, allowed: boolean, reasons: FillReason[], supervised: boolean }>(
    `SELECT count(*) OVER ()::int AS total, f.id, f.created_at, f.held_on::text AS held_on, f.event_id, e.site, v.tag, f.pressure_bar,
        f.allowed, f.reasons, f.supervisor_membership_id IS NOT NULL AS supervised
      FROM fills f JOIN launch_events e ON e.id = f.event_id JOIN vessels v ON v.id = f.vessel_id
     WHERE f.membership_id = :memberId AND f.club_id = :clubId
     ORDER BY f.created_at DESC, f.id LIMIT :limit OFFSET :offset`,
    { replacements: { memberId: actor.membership.id, clubId: actor.club.id, limit: query.pageSize, offset: (query.page - 1) * query.pageSize }, type: QueryTypes.SELECT })
  return {
    items: rows.map(r => ({
      id: r.id, recordedAt: new Date(r.created_at).toISOString(), heldOn: r.held_on, eventId: r.event_id, eventSite: r.site,
      vesselTag: r.tag, pressureBar: r.pressure_bar, allowed: r.allowed, reasons: r.reasons, supervised: r.supervised,
    })),
    page: query.page, pageSize: query.pageSize, total: rows[0]?.total ?? 0,
  }
}
