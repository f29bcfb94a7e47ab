import type { Actor } from '../../../utils/auth'
import { addCalendarDays, dateInZone } from '#shared/utils/dates'
import type { VesselPolicyDto } from '#shared/types/proof-tests'
import { vesselPolicy } from '../../vessels'

/** What every desk query starts from: the club, its time zone and today, and whether the reader sees injury details. */
export interface DeskContext {
  clubId: string
  timeZone: string
  today: string
  /** The club's vessel policy (the proof standing's intervals and fill limits), read only for what lists or counts proofs. */
  policy: VesselPolicyDto | null
  /** The safety officer (incidents.review) sees an injury's personal details; an admin reading the desk does not. */
  officer: boolean
  /** The SQL replacements every desk query may use. */
  replacements: Record<string, unknown>
}

/**
 * The desk context of `actor` at `now`. The club and its time zone come with the signed-in actor
 * (read fresh on every request), so only the vessel policy costs a query, and only when `policy` asks
 * for it: a desk request pays one round trip to the database less than it would reading both.
 */
export async function deskContext(actor: Actor, { policy = false }: { policy?: boolean } = {}, now = new Date()): Promise<DeskContext> {
  const { id: clubId, timeZone } = actor.club
  const today = dateInZone(now, timeZone)
  return {
    clubId, timeZone, today, policy: policy ? await vesselPolicy(clubId) : null, officer: actorCan(actor, 'incidents.review'),
    replacements: {
      clubId, tz: timeZone, today,
      d30: addCalendarDays(today, 30), d60: addCalendarDays(today, 60), d90: addCalendarDays(today, 90),
    },
  }
}

/** The vessel policy of a context read with `policy`; a programming error otherwise. */
export function deskPolicy(ctx: DeskContext): VesselPolicyDto {
  if (!ctx.policy) throw new Error('This desk query reads proofs: make its context with { policy: true }')
  return ctx.policy
}
