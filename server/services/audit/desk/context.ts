import { QueryTypes } from 'sequelize'
import type { Actor } from '../../../utils/auth'
import { addCalendarDays, dateInZone } from '#shared/utils/dates'
import type { VesselPolicyDto } from '#shared/types/proof-tests'
import { POLICY_COLUMNS_SQL, toPolicyDto, type PolicyRow } from '../../vessels'

/** What every desk query starts from: the club, its time zone and today, and whether the reader sees injury details. */
export interface DeskContext {
  clubId: string
  timeZone: string
  today: string
  /** The club's vessel policy (the proof standing's intervals and fill limits). */
  policy: VesselPolicyDto
  /** The safety officer (incidents.review) sees an injury's personal details; an admin reading the desk does not. */
  officer: boolean
  /** The SQL replacements every desk query may use. */
  replacements: Record<string, unknown>
}

/** The desk context of `actor` at `now`. */
export async function deskContext(actor: Actor, now = new Date()): Promise<DeskContext> {
  const [club] = await useDb().query<PolicyRow & { time_zone: string }>(
    `SELECT c.time_zone, ${POLICY_COLUMNS_SQL} FROM clubs c LEFT JOIN vessel_policies p ON p.club_id = c.id WHERE c.id = :id`,
    { replacements: { id: actor.club.id }, type: QueryTypes.SELECT })
  const timeZone = club?.time_zone ?? 'UTC'
  const today = dateInZone(now, timeZone)
  return {
    clubId: actor.club.id, timeZone, today, policy: toPolicyDto(club!), officer: actorCan(actor, 'incidents.review'),
    replacements: {
      clubId: actor.club.id, tz: timeZone, today,
      d30: addCalendarDays(today, 30), d60: addCalendarDays(today, 60), d90: addCalendarDays(today, 90),
    },
  }
}
