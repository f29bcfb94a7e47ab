import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { actorCan } from '../../utils/auth'
import { clubToday } from '../clubs'
import type { FillDeskDto } from '#shared/types/fill-passes'
import { MIN_EQUIPMENT_FACTOR, gaugeCurrentThrough, stationLaunchLimitBar } from '#shared/utils/event-rules'

interface DeskRow {
  id: string
  held_on: string
  site: string
  pressure_cap_bar: string
  competition: boolean
  cancelled: boolean
  on_staff: boolean
  equipment_factor: string | null
  stations: { id: string, name: string, ratingBar: number, calibratedOn: string, intervalMonths: number }[]
  members: { id: string, name: string }[]
}

/**
 * What the launch-side fill page needs for event `eventId` of the actor's club, in one query: the
 * event, its fill stations (with the pressure each may launch at: its lowest rated part ÷ the club's
 * equipment factor) and, for the event's staff with `fills.record_any`, the members registered.
 * Null when the club has no such event. The gate itself decides every fill.
 */
export async function fillDesk(actor: Actor, eventId: string): Promise<FillDeskDto | null> {
  const [row] = await useDb().query<DeskRow>(
    `SELECT e.id, e.held_on::text, e.site, e.pressure_cap_bar, e.competition, e.cancelled_at IS NOT NULL AS cancelled,
            EXISTS (SELECT 1 FROM launch_event_staff s WHERE s.event_id = e.id AND s.membership_id = :me) AS on_staff,
            (SELECT equipment_factor FROM vessel_policies WHERE club_id = e.club_id) AS equipment_factor,
            COALESCE((SELECT json_agg(json_build_object('id', f.id, 'name', f.name, 'ratingBar', f.lowest_part_rating_bar,
                        'calibratedOn', f.gauge_calibrated_on::text, 'intervalMonths', f.gauge_interval_months) ORDER BY f.name)
                        FROM launch_event_stations ls JOIN fill_stations f ON f.id = ls.station_id WHERE ls.event_id = e.id), '[]') AS stations,
            COALESCE((SELECT json_agg(json_build_object('id', r.membership_id, 'name', u.name) ORDER BY u.name)
                        FROM launch_event_registrations r JOIN memberships m ON m.id = r.membership_id JOIN users u ON u.id = m.user_id
                       WHERE r.event_id = e.id AND r.withdrawn_at IS NULL), '[]') AS members
       FROM launch_events e WHERE e.id = :eventId AND e.club_id = :club`,
    { replacements: { eventId, club: actor.club.id, me: actor.membership.id }, type: QueryTypes.SELECT })
  if (!row) return null
  const staff = row.on_staff && actorCan(actor, 'fills.record_any')
  const factor = row.equipment_factor === null ? MIN_EQUIPMENT_FACTOR : Number(row.equipment_factor)
  return {
    event: {
      id: row.id, heldOn: row.held_on, site: row.site, pressureCapBar: Number(row.pressure_cap_bar),
      competition: row.competition, cancelled: row.cancelled,
    },
    stations: row.stations.map(s => ({
      id: s.id, name: s.name, launchPressureBar: stationLaunchLimitBar(Number(s.ratingBar), factor),
      gaugeDueOn: gaugeCurrentThrough(s.calibratedOn, s.intervalMonths),
    })),
    staff,
    supervisor: row.on_staff && actorCan(actor, 'training.run'),
    members: staff ? row.members : [],
    me: { id: actor.membership.id, name: actor.user.name },
    today: clubToday(actor.club),
  }
}
