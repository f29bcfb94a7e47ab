import { QueryTypes } from 'sequelize'
import { addCalendarDays } from '#shared/utils/dates'
import { localToInstant, weekdayIndex, type OpeningHours } from '#shared/utils/booking-time'
import type { StationKind } from '#shared/utils/stations'
import { DEMO_TIME_ZONE, type SeedContext } from './context'

const INSTRUCTOR = 'instructor@hoopwise.example'
const SAFETY = 'safety@hoopwise.example'

const everyDay = (opens: string, closes: string): OpeningHours => Array.from({ length: 7 }, () => ({ opens, closes }))
const WORKSHOP_HOURS = everyDay('09:00', '21:00')
// The rig runs only when an operator session is on: Wednesday evenings and weekend days.
const RIG_HOURS: OpeningHours = [null, null, { opens: '18:00', closes: '21:00' }, null, null, { opens: '10:00', closes: '16:00' }, { opens: '10:00', closes: '16:00' }]

interface DemoStation { name: string, kind: StationKind, courses: string[], maxMinutes: number, hours: OpeningHours, adultsOnly: boolean }

/** The stations every demo workshop starts with (composite work is for adults). */
export const DEMO_STATIONS: DemoStation[] = [
  { name: 'Laminating bench A', kind: 'laminating_bench', courses: ['composite_ppe'], maxMinutes: 240, hours: WORKSHOP_HOURS, adultsOnly: true },
  { name: 'Laminating bench B', kind: 'laminating_bench', courses: ['composite_ppe'], maxMinutes: 240, hours: WORKSHOP_HOURS, adultsOnly: true },
  ...[1, 2, 3, 4, 5, 6].map(n => ({ name: `Cure rack slot ${n}`, kind: 'cure_rack_slot' as const, courses: ['composite_ppe'], maxMinutes: 10_080, hours: everyDay('00:00', '24:00'), adultsOnly: true })),
  { name: 'Sanding booth (extraction)', kind: 'sanding_booth', courses: ['composite_ppe', 'respirator_fit'], maxMinutes: 120, hours: WORKSHOP_HOURS, adultsOnly: true },
  { name: 'Hydrostatic test rig', kind: 'test_rig', courses: ['rig_operator'], maxMinutes: 120, hours: RIG_HOURS, adultsOnly: false },
]

// A week of bookings by the demo instructor and safety officer, wall-clock times in the club's zone.
// Seeds are trusted data: these rows are written directly, without the booking route's checks.
const DEMO_BOOKINGS: { station: string, who: string, day: number, from: string, to: string, note: string, cureHours?: number }[] = [
  { station: 'Laminating bench A', who: INSTRUCTOR, day: 1, from: '14:00', to: '17:00', note: 'Overwrap for a 104 mm liner', cureHours: 24 },
  { station: 'Laminating bench B', who: SAFETY, day: 2, from: '18:00', to: '20:00', note: 'Fin can layup', cureHours: 48 },
  { station: 'Sanding booth (extraction)', who: SAFETY, day: 3, from: '10:00', to: '11:30', note: 'Trim and sand the fin can' },
  { station: 'Laminating bench A', who: SAFETY, day: 4, from: '15:00', to: '19:00', note: 'Nose cone' },
  { station: 'Laminating bench B', who: INSTRUCTOR, day: 5, from: '09:30', to: '12:00', note: 'Repair patch, Longshore' },
  { station: 'Sanding booth (extraction)', who: INSTRUCTOR, day: 6, from: '16:00', to: '17:30', note: '' },
]

/** Seeds the workshop stations and a week of bookings (idempotent: by station name and start). */
export async function seedStations(ctx: SeedContext): Promise<void> {
  const { sequelize, transaction } = ctx
  const ids = new Map<string, string>()
  for (const [position, s] of DEMO_STATIONS.entries()) {
    const [row] = await sequelize.query<{ id: string }>(
      `INSERT INTO stations (club_id, name, kind, required_courses, max_booking_minutes, opening_hours, adults_only, position)
       VALUES (:clubId, :name, :kind, ARRAY(SELECT jsonb_array_elements_text(:courses::jsonb)), :maxMinutes, :hours::jsonb, :adultsOnly, :position)
       ON CONFLICT (club_id, name) DO UPDATE SET name = EXCLUDED.name RETURNING id`,
      { replacements: { clubId: ctx.clubId, ...s, courses: JSON.stringify(s.courses), hours: JSON.stringify(s.hours), position }, type: QueryTypes.SELECT, transaction })
    ids.set(s.name, row!.id)
  }
  const book = async (stationId: string, membershipId: string, start: Date, end: Date, note: string, cureFor: string | null) => {
    const [row] = await sequelize.query<{ id: string }>(
      `INSERT INTO bookings (club_id, station_id, membership_id, starts_at, ends_at, note, cure_for_booking_id)
       SELECT :clubId, :stationId, :membershipId, :start, :end, :note, :cureFor
        WHERE NOT EXISTS (SELECT 1 FROM bookings WHERE station_id = :stationId AND cancelled_at IS NULL AND during && tstzrange(:start, :end, '[)'))
       RETURNING id`,
      { replacements: { clubId: ctx.clubId, stationId, membershipId, start, end, note, cureFor }, type: QueryTypes.SELECT, transaction })
    return row?.id ?? null
  }
  for (const [i, b] of DEMO_BOOKINGS.entries()) {
    const who = ctx.memberIds.get(b.who)
    if (!who) continue
    const date = addCalendarDays(ctx.today, b.day)
    const start = localToInstant(`${date}T${b.from}`, DEMO_TIME_ZONE)
    const end = localToInstant(`${date}T${b.to}`, DEMO_TIME_ZONE)
    if (!start || !end) continue
    const id = await book(ids.get(b.station)!, who, start, end, b.note, null)
    if (id && b.cureHours) {
      await book(ids.get(`Cure rack slot ${(i % 6) + 1}`)!, who, end, new Date(end.getTime() + b.cureHours * 3_600_000), 'Cure hold', id)
    }
  }
  // A proof-test session on the rig the next Saturday.
  const saturday = addCalendarDays(ctx.today, ((5 - weekdayIndex(ctx.today) + 7) % 7) || 7)
  const rigStart = localToInstant(`${saturday}T10:00`, DEMO_TIME_ZONE)
  const rigEnd = localToInstant(`${saturday}T12:00`, DEMO_TIME_ZONE)
  const safety = ctx.memberIds.get(SAFETY)
  if (rigStart && rigEnd && safety) await book(ids.get('Hydrostatic test rig')!, safety, rigStart, rigEnd, 'Proof tests for the club', null)
}
