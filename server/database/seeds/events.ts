import { QueryTypes } from 'sequelize'
import { addCalendarDays, addCalendarMonths } from '#shared/utils/dates'
import { airCharge } from '#shared/utils/vessel-arithmetic'
import { fillReason, type FillReasonCode, type LimitingFactor } from '#shared/utils/fill-reasons'
import { permittedMaximum } from '#shared/utils/fill-gate'
import { MIN_EQUIPMENT_FACTOR } from '#shared/utils/event-rules'
import type { SeedContext } from './context'

const MEMBER = 'member@hoopwise.example'
const INSTRUCTOR = 'instructor@hoopwise.example'
const SAFETY = 'safety@hoopwise.example'
const ODILE = 'odile.marshcombe@members.hoopwise.example'
const VESNA = 'vesna.fluke@members.hoopwise.example'
const WREN = 'wren.gullyhaven@members.hoopwise.example'
const YESTIN = 'yestin.mudlark@members.hoopwise.example'

interface DemoStation { name: string, description: string, ratingBar: number, gauge: string, calibratedMonthsAgo: number, intervalMonths: number }

// Three launchers; the brass one's gauge is past its calibration (calibrated 13 months ago, every 12).
const STATIONS: DemoStation[] = [
  { name: 'Launcher A, north pad', description: 'Clamp launcher, braided hose, regulator on the cylinder.', ratingBar: 60, gauge: 'Gauge A (0–40 bar)', calibratedMonthsAgo: 3, intervalMonths: 12 },
  { name: 'Launcher B, quick-release rig', description: 'Hose-tail quick release, foot pump or cylinder.', ratingBar: 45, gauge: 'Gauge B (0–25 bar)', calibratedMonthsAgo: 11, intervalMonths: 12 },
  { name: 'Old brass launcher', description: 'The club\'s first launcher, kept for demonstrations.', ratingBar: 36, gauge: 'Brass gauge (0–16 bar)', calibratedMonthsAgo: 13, intervalMonths: 12 },
]

/** One row of the fill log as the gate would have written it (the facts it decided on, given here). */
interface DemoFill {
  member: string
  vessel: string
  station: number
  pressureBar: number
  waterL: number
  /** The limits the gate weighed: the member's tier cap and the vessel's rated fill (0: not in service). */
  tierCapBar: number
  ratedFillBar: number
  reasons: FillReasonCode[]
}

interface DemoEvent { site: string, daysFromToday: number, capBar: number, competition: boolean, stations: number[], staff: string[], registered: string[], fills: DemoFill[], notes: string }

const EVENTS: DemoEvent[] = [
  {
    site: 'Saltings north flat', daysFromToday: -40, capBar: 12, competition: false, stations: [0, 1], staff: [INSTRUCTOR, SAFETY],
    registered: [MEMBER, YESTIN, ODILE], notes: 'Low tide at 11:00; launches toward the estuary only.',
    fills: [
      { member: MEMBER, vessel: 'Gull', station: 0, pressureBar: 8, waterL: 0.6, tierCapBar: 10, ratedFillBar: 10.66, reasons: [] },
      { member: YESTIN, vessel: 'Whimbrel', station: 1, pressureBar: 7, waterL: 0.5, tierCapBar: 10, ratedFillBar: 8, reasons: [] },
      { member: MEMBER, vessel: 'Heron', station: 0, pressureBar: 9, waterL: 0.9, tierCapBar: 10, ratedFillBar: 0, reasons: ['VESSEL_NOT_IN_SERVICE'] },
      { member: YESTIN, vessel: 'Whimbrel', station: 1, pressureBar: 9, waterL: 0.5, tierCapBar: 10, ratedFillBar: 8, reasons: ['RATED_FILL_EXCEEDED'] },
    ],
  },
  {
    site: 'Harbour wall field', daysFromToday: -14, capBar: 10, competition: true, stations: [0], staff: [INSTRUCTOR, ODILE],
    registered: [MEMBER, VESNA, WREN, ODILE], notes: 'Club competition: air only, no metal in the pressure path.',
    fills: [
      { member: WREN, vessel: 'Redshank', station: 0, pressureBar: 9, waterL: 1, tierCapBar: 17, ratedFillBar: 20, reasons: [] },
      { member: VESNA, vessel: 'Sandpiper', station: 0, pressureBar: 8, waterL: 0.45, tierCapBar: 10, ratedFillBar: 0, reasons: ['PROOF_LAPSED'] },
      { member: MEMBER, vessel: 'Gull', station: 0, pressureBar: 11, waterL: 0.6, tierCapBar: 10, ratedFillBar: 10.66, reasons: ['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED', 'EVENT_CAP_EXCEEDED'] },
      { member: MEMBER, vessel: 'Gull', station: 0, pressureBar: 9.5, waterL: 0.6, tierCapBar: 10, ratedFillBar: 10.66, reasons: [] },
      { member: ODILE, vessel: 'Stint', station: 0, pressureBar: 9, waterL: 0.3, tierCapBar: 17, ratedFillBar: 12, reasons: [] },
    ],
  },
  {
    site: 'Marsh end meadow', daysFromToday: 10, capBar: 17, competition: false, stations: [0, 1], staff: [INSTRUCTOR, SAFETY],
    registered: [MEMBER, VESNA, WREN, YESTIN], notes: 'Bring your fill pass and your vessels\' labels. Eye protection for everyone at the pads.',
    fills: [],
  },
]

/**
 * Fill stations (one gauge past calibration), two past launch events with fills and refusals written
 * straight into the log as the gate would have, and one upcoming event with the demo instructor on its
 * staff and members registered. Stations are found by name and events by site, so a second run adds nothing.
 */
export async function seedEvents(ctx: SeedContext): Promise<void> {
  const { transaction, clubId, sequelize } = ctx
  if (!clubId) throw new Error('seedClub must run before seedEvents')
  const member = (email: string) => {
    const id = ctx.memberIds.get(email)
    if (!id) throw new Error(`seedMembers must run before seedEvents (${email})`)
    return id
  }
  const stationIds: string[] = []
  for (const s of STATIONS) {
    const [row] = await sequelize.query<{ id: string }>(
      `INSERT INTO fill_stations (club_id, name, description, lowest_part_rating_bar, gauge_name, gauge_calibrated_on, gauge_interval_months)
       VALUES (:clubId, :name, :description, :rating, :gauge, :calibratedOn, :interval)
       ON CONFLICT (club_id, name) DO UPDATE SET name = EXCLUDED.name RETURNING id`,
      { replacements: { clubId, name: s.name, description: s.description, rating: s.ratingBar, gauge: s.gauge, calibratedOn: addCalendarMonths(ctx.today, -s.calibratedMonthsAgo), interval: s.intervalMonths }, type: QueryTypes.SELECT, transaction })
    stationIds.push(row!.id)
  }
  for (const e of EVENTS) {
    const [found] = await sequelize.query<{ id: string }>('SELECT id FROM launch_events WHERE club_id = :clubId AND site = :site',
      { replacements: { clubId, site: e.site }, type: QueryTypes.SELECT, transaction })
    if (found) continue
    const heldOn = addCalendarDays(ctx.today, e.daysFromToday)
    const [created] = await sequelize.query<{ id: string }>(
      `INSERT INTO launch_events (club_id, held_on, site, pressure_cap_bar, competition, notes, created_by_membership_id)
       VALUES (:clubId, :heldOn, :site, :cap, :competition, :notes, :by) RETURNING id`,
      { replacements: { clubId, heldOn, site: e.site, cap: e.capBar, competition: e.competition, notes: e.notes, by: member(SAFETY) }, type: QueryTypes.SELECT, transaction })
    const eventId = created!.id
    const insert = (sql: string, replacements: Record<string, unknown>) => sequelize.query(sql, { replacements: { eventId, clubId, ...replacements }, transaction })
    for (const i of e.stations) await insert('INSERT INTO launch_event_stations (event_id, club_id, station_id) VALUES (:eventId, :clubId, :id)', { id: stationIds[i] })
    for (const who of e.staff) await insert('INSERT INTO launch_event_staff (event_id, club_id, membership_id) VALUES (:eventId, :clubId, :id)', { id: member(who) })
    for (const who of e.registered) await insert('INSERT INTO launch_event_registrations (event_id, club_id, membership_id) VALUES (:eventId, :clubId, :id)', { id: member(who) })
    for (const [n, f] of e.fills.entries()) {
      const [vessel] = await sequelize.query<{ id: string, volume_l: string }>('SELECT id, volume_l FROM vessels WHERE club_id = :clubId AND owner_membership_id = :owner AND name = :name',
        { replacements: { clubId, owner: member(f.member), name: f.vessel }, type: QueryTypes.SELECT, transaction })
      if (!vessel) throw new Error(`seedVessels must run before seedEvents (${f.vessel})`)
      const charge = airCharge({ gaugePressure: f.pressureBar, unit: 'bar', vesselVolumeL: Number(vessel.volume_l), waterVolumeL: f.waterL, distanceRule: 'tnt' })
      const limits: Record<LimitingFactor, number> = {
        TIER: f.tierCapBar, VESSEL_RATING: f.ratedFillBar, EVENT_CAP: e.capBar, EQUIPMENT_RATING: STATIONS[f.station]!.ratingBar / MIN_EQUIPMENT_FACTOR,
      }
      const { permittedMaxBar, limitingFactor } = permittedMaximum(limits)
      await insert(
        `INSERT INTO fills (club_id, event_id, held_on, station_id, membership_id, vessel_id, recorded_by_membership_id, pressure_bar,
           entered_pressure, entered_unit, water_volume_l, allowed, permitted_max_bar, limiting_factor, reasons, stored_energy_j,
           tnt_equivalent_kg, minimum_distance_m, created_at, tier_rank)
         VALUES (:clubId, :eventId, :heldOn, :stationId, :memberId, :vesselId, :recordedBy, :pressure, :pressure, 'bar', :water, :allowed,
           :permittedMaxBar, :limitingFactor, :reasons::jsonb, :energy, :tnt, :distance, (:heldOn::date + time '10:00' + :minutes * interval '1 minute') AT TIME ZONE 'Europe/London',
           (SELECT max(t.rank) FROM member_tiers t WHERE t.membership_id = :memberId AND t.first_granted_on <= :heldOn::date AND t.expires_on >= :heldOn::date AND t.revoked_at IS NULL AND t.confirmed_at IS NOT NULL))`,
        {
          heldOn, stationId: stationIds[f.station], memberId: member(f.member), vesselId: vessel.id, recordedBy: member(e.staff[0]!),
          pressure: f.pressureBar, water: f.waterL, allowed: f.reasons.length === 0, permittedMaxBar, limitingFactor,
          reasons: JSON.stringify(f.reasons.map(code => fillReason(code))), energy: charge.storedEnergyJ, tnt: charge.tntEquivalentKg,
          distance: charge.minimumDistanceM, minutes: n * 12,
        })
    }
  }
}
