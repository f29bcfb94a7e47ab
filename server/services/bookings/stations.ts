import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import type { StationInput } from '#shared/schemas/bookings'
import type { StationDto } from '#shared/types/bookings'
import type { OpeningHours } from '#shared/utils/booking-time'
import type { StationKind } from '#shared/utils/stations'

export interface StationRow {
  id: string
  name: string
  kind: StationKind
  required_courses: string[]
  courses: { code: string, name: string }[]
  max_booking_minutes: number
  opening_hours: OpeningHours
  adults_only: boolean
  position: number
}

// The required courses come with the club's names for them (a code the club has no course for shows as itself).
const STATION_SELECT = `
  SELECT s.id, s.name, s.kind, s.required_courses, s.max_booking_minutes, s.opening_hours, s.adults_only, s.position,
    COALESCE((SELECT json_agg(json_build_object('code', rc.code, 'name', COALESCE(c.name, rc.code)) ORDER BY rc.ord)
      FROM unnest(s.required_courses) WITH ORDINALITY rc(code, ord)
      LEFT JOIN courses c ON c.club_id = s.club_id AND c.code = rc.code), '[]'::json) AS courses
  FROM stations s`

/** A station row as the API shows it. */
export function stationDto(r: StationRow): StationDto {
  return {
    id: r.id, name: r.name, kind: r.kind, requiredCourses: r.courses, maxBookingMinutes: r.max_booking_minutes,
    openingHours: r.opening_hours, adultsOnly: r.adults_only, position: r.position,
  }
}

/** Club `clubId`'s stations in their order (position, then name); one of them with `stationId`. */
export async function loadStations(clubId: string, opts: { stationId?: string, kind?: StationKind, transaction?: Transaction } = {}): Promise<StationRow[]> {
  return useDb().query<StationRow>(
    `${STATION_SELECT} WHERE s.club_id = :clubId ${opts.stationId ? 'AND s.id = :stationId' : ''} ${opts.kind ? 'AND s.kind = :kind' : ''}
     ORDER BY s.position, s.name`,
    { replacements: { clubId, stationId: opts.stationId ?? null, kind: opts.kind ?? null }, type: QueryTypes.SELECT, transaction: opts.transaction })
}

/** Club `clubId`'s stations as the API shows them. */
export async function listStations(clubId: string): Promise<StationDto[]> {
  return (await loadStations(clubId)).map(stationDto)
}

/** 422 unless every code in `codes` names one of club `clubId`'s courses. */
async function checkCourseCodes(clubId: string, codes: string[], transaction: Transaction): Promise<void> {
  if (!codes.length) return
  const found = await useDb().query<{ code: string }>('SELECT code FROM courses WHERE club_id = :clubId AND code IN (:codes)',
    { replacements: { clubId, codes }, type: QueryTypes.SELECT, transaction })
  const missing = codes.filter(c => !found.some(f => f.code === c))
  if (missing.length) refuse(missing.map(code => ({ code: 'UNKNOWN_COURSE', message: `The club has no course with the code ${code}.` })))
}

const columns = (input: StationInput) => ({
  name: input.name, kind: input.kind, requiredCourses: JSON.stringify(input.requiredCourses), maxBookingMinutes: input.maxBookingMinutes,
  openingHours: JSON.stringify(input.openingHours), adultsOnly: input.adultsOnly, position: input.position ?? 0,
})

/** An officer with `stations.manage` adds a station to their club (audited). 409 when the name is taken. */
export async function createStation(actor: Actor, input: StationInput): Promise<StationDto> {
  const clubId = actor.club.id
  const id = await inTransaction(async (transaction) => {
    await checkCourseCodes(clubId, input.requiredCourses, transaction)
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO stations (club_id, name, kind, required_courses, max_booking_minutes, opening_hours, adults_only, position)
       VALUES (:clubId, :name, :kind, ARRAY(SELECT jsonb_array_elements_text(:requiredCourses::jsonb)), :maxBookingMinutes, :openingHours::jsonb, :adultsOnly, :position)
       RETURNING id`,
      { replacements: { clubId, ...columns(input) }, type: QueryTypes.SELECT, transaction })
    await recordAudit(actor, clubId, { action: 'station.create', subjectType: 'station', subjectId: row!.id, after: { ...input } }, transaction)
    return row!.id
  }, { uniqueMessage: 'The club already has a station with that name.' })
  return stationDto((await loadStations(clubId, { stationId: id }))[0]!)
}

/** An officer with `stations.manage` changes station `id` of their club (audited, before and after). 404 when not theirs. */
export async function updateStation(actor: Actor, id: string, input: StationInput): Promise<StationDto> {
  const clubId = actor.club.id
  await inTransaction(async (transaction) => {
    const [before] = await loadStations(clubId, { stationId: id, transaction })
    if (!before) notFound('No such station')
    await checkCourseCodes(clubId, input.requiredCourses, transaction)
    await useDb().query(
      `UPDATE stations SET name = :name, kind = :kind, required_courses = ARRAY(SELECT jsonb_array_elements_text(:requiredCourses::jsonb)), max_booking_minutes = :maxBookingMinutes,
         opening_hours = :openingHours::jsonb, adults_only = :adultsOnly, position = :position, updated_at = now()
       WHERE id = :id AND club_id = :clubId`,
      { replacements: { id, clubId, ...columns(input) }, transaction })
    await recordAudit(actor, clubId, {
      action: 'station.update', subjectType: 'station', subjectId: id,
      before: {
        name: before.name, kind: before.kind, requiredCourses: before.required_courses, maxBookingMinutes: before.max_booking_minutes,
        openingHours: before.opening_hours, adultsOnly: before.adults_only, position: before.position,
      },
      after: { ...input },
    }, transaction)
  }, { uniqueMessage: 'The club already has a station with that name.' })
  return stationDto((await loadStations(clubId, { stationId: id }))[0]!)
}
