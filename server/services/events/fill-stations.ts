import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { clubToday } from '../clubs'
import type { FillStationInput } from '#shared/schemas/events'
import { enteredBar } from '#shared/schemas/events'
import type { FillStationDto, FillStationListDto } from '#shared/types/events'
import { MIN_EQUIPMENT_FACTOR, gaugeCurrentThrough, gaugeState, stationLaunchLimitBar } from '#shared/utils/event-rules'

export interface FillStationRow {
  id: string
  name: string
  description: string
  lowest_part_rating_bar: string
  gauge_name: string
  gauge_calibrated_on: string
  gauge_interval_months: number
  retired_at: Date | null
  equipment_factor: string | null
}

/** The columns of `fill_stations s` with the club's equipment factor (3 until the policy sets one). */
export const FILL_STATION_COLUMNS = `s.id, s.name, s.description, s.lowest_part_rating_bar, s.gauge_name,
  s.gauge_calibrated_on::text AS gauge_calibrated_on, s.gauge_interval_months, s.retired_at,
  (SELECT p.equipment_factor FROM vessel_policies p WHERE p.club_id = s.club_id) AS equipment_factor`

/** A fill station row as the API shows it, on the club's `today`. */
export function fillStationDto(r: FillStationRow, today: string): FillStationDto {
  const factor = r.equipment_factor === null ? MIN_EQUIPMENT_FACTOR : Number(r.equipment_factor)
  const rating = Number(r.lowest_part_rating_bar)
  const through = gaugeCurrentThrough(r.gauge_calibrated_on, r.gauge_interval_months)
  return {
    id: r.id, name: r.name, description: r.description, lowestPartRatingBar: rating,
    launchLimitBar: stationLaunchLimitBar(rating, factor), equipmentFactor: factor,
    gaugeName: r.gauge_name, gaugeCalibratedOn: r.gauge_calibrated_on, gaugeIntervalMonths: r.gauge_interval_months,
    gaugeCurrentThrough: through, gaugeState: gaugeState(through, today),
    retiredAt: r.retired_at ? new Date(r.retired_at).toISOString() : null,
  }
}

/** Club `clubId`'s fill stations (by name), live ones only unless `includeRetired`; or those with `ids`. */
export async function loadFillStations(clubId: string, opts: { includeRetired?: boolean, ids?: string[], transaction?: Transaction } = {}): Promise<FillStationRow[]> {
  if (opts.ids && !opts.ids.length) return []
  return useDb().query<FillStationRow>(
    `SELECT ${FILL_STATION_COLUMNS} FROM fill_stations s WHERE s.club_id = :clubId
      ${opts.includeRetired || opts.ids ? '' : 'AND s.retired_at IS NULL'} ${opts.ids ? 'AND s.id IN (:ids)' : ''}
      ORDER BY s.name`,
    { replacements: { clubId, ids: opts.ids ?? null }, type: QueryTypes.SELECT, transaction: opts.transaction })
}

/** The club's fill stations with both pressures and their gauges; the gauges due within 30 days or past due, soonest first. */
export async function listFillStations(actor: Actor, includeRetired: boolean, now = new Date()): Promise<FillStationListDto> {
  const today = clubToday(actor.club, now)
  const items = (await loadFillStations(actor.club.id, { includeRetired })).map(r => fillStationDto(r, today))
  const gaugesDue = items.filter(s => !s.retiredAt && s.gaugeState !== 'current')
    .sort((a, b) => a.gaugeCurrentThrough.localeCompare(b.gaugeCurrentThrough) || a.name.localeCompare(b.name))
  const [policy] = await useDb().query<{ equipment_factor: string }>('SELECT equipment_factor FROM vessel_policies WHERE club_id = :clubId',
    { replacements: { clubId: actor.club.id }, type: QueryTypes.SELECT })
  return { items, gaugesDue, equipmentFactor: policy ? Number(policy.equipment_factor) : MIN_EQUIPMENT_FACTOR, today }
}

// The rating is kept to the hundredth of a bar, rounded DOWN from what was entered (a psi figure
// converted exactly would otherwise round up past what the part is rated for).
const columns = (input: FillStationInput) => ({
  name: input.name, description: input.description,
  rating: Math.floor(enteredBar(input.lowestPartRating, input.unit) * 100 + 1e-9) / 100,
  gaugeName: input.gaugeName, calibratedOn: input.gaugeCalibratedOn, intervalMonths: input.gaugeIntervalMonths,
})

/** What the audit trail keeps of a station: figures and dates, no free text beyond its name. */
const auditView = (s: FillStationDto) => ({
  name: s.name, lowestPartRatingBar: s.lowestPartRatingBar, gaugeName: s.gaugeName,
  gaugeCalibratedOn: s.gaugeCalibratedOn, gaugeIntervalMonths: s.gaugeIntervalMonths,
})

async function oneStation(actor: Actor, id: string, transaction?: Transaction): Promise<FillStationDto | null> {
  const [row] = await loadFillStations(actor.club.id, { ids: [id], transaction })
  return row ? fillStationDto(row, clubToday(actor.club)) : null
}

/** An officer with `events.manage` adds a fill station (audited). 409 when the club has one of that name. */
export async function createFillStation(actor: Actor, input: FillStationInput): Promise<FillStationDto> {
  return inTransaction(async (transaction) => {
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO fill_stations (club_id, name, description, lowest_part_rating_bar, gauge_name, gauge_calibrated_on, gauge_interval_months)
       VALUES (:clubId, :name, :description, :rating, :gaugeName, :calibratedOn, :intervalMonths) RETURNING id`,
      { replacements: { clubId: actor.club.id, ...columns(input) }, type: QueryTypes.SELECT, transaction })
    const station = (await oneStation(actor, row!.id, transaction))!
    await recordAudit(actor, actor.club.id, { action: 'fill_station.create', subjectType: 'fill_station', subjectId: station.id, after: auditView(station) }, transaction)
    return station
  }, { uniqueMessage: 'The club already has a fill station with that name.' })
}

/** An officer with `events.manage` changes fill station `id` (audited before and after). 404 when not the club's; 422 when retired. */
export async function updateFillStation(actor: Actor, id: string, input: FillStationInput): Promise<FillStationDto> {
  return inTransaction(async (transaction) => {
    const before = await oneStation(actor, id, transaction)
    if (!before) notFound('No such fill station')
    if (before.retiredAt) refuse({ code: 'STATION_RETIRED', message: 'This fill station is retired: it is kept as it was.' })
    await useDb().query(
      `UPDATE fill_stations SET name = :name, description = :description, lowest_part_rating_bar = :rating, gauge_name = :gaugeName,
        gauge_calibrated_on = :calibratedOn, gauge_interval_months = :intervalMonths, updated_at = now()
       WHERE id = :id AND club_id = :clubId`,
      { replacements: { id, clubId: actor.club.id, ...columns(input) }, transaction })
    const after = (await oneStation(actor, id, transaction))!
    await recordAudit(actor, actor.club.id, { action: 'fill_station.update', subjectType: 'fill_station', subjectId: id, before: auditView(before), after: auditView(after) }, transaction)
    return after
  }, { uniqueMessage: 'The club already has a fill station with that name.' })
}

/**
 * An officer with `events.manage` retires fill station `id` (audited, with the reason): it stays in the
 * fill log of past events but is offered for no new event. 404 when not the club's; 422 when already retired.
 */
export async function retireFillStation(actor: Actor, id: string, reason: string): Promise<FillStationDto> {
  return inTransaction(async (transaction) => {
    const [row] = await useDb().query<{ id: string }>(
      'UPDATE fill_stations SET retired_at = now(), updated_at = now() WHERE id = :id AND club_id = :clubId AND retired_at IS NULL RETURNING id',
      { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
    if (!row) {
      if (await oneStation(actor, id, transaction)) refuse({ code: 'STATION_RETIRED', message: 'This fill station is already retired.' })
      notFound('No such fill station')
    }
    await recordAudit(actor, actor.club.id, { action: 'fill_station.retire', subjectType: 'fill_station', subjectId: id, before: { retired: false }, after: { retired: true }, reason }, transaction)
    return (await oneStation(actor, id, transaction))!
  })
}
