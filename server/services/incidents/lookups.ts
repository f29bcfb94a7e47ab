import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { containsPattern } from '../../utils/like-pattern'
import type { IncidentPersonChoiceDto, IncidentVesselDto } from '#shared/types/incidents'
import type { VesselState } from '#shared/utils/vessel-states'

/**
 * Who may be named as involved, over `memberships m`: approved and not resigned. A suspended or
 * lapsed member is still a member (leaving them out would tell any member who is suspended).
 */
export const INVOLVED_MEMBER_SQL = 'm.approved_at IS NOT NULL AND m.resigned_at IS NULL'

/** The most people one search answers: the form asks for more letters rather than a longer list. */
const PEOPLE_LIMIT = 10

/**
 * The members of the actor's club whose name contains `q`, for the report form's people involved:
 * any signed-in member may ask, so the answer is the id and the name only — never an e-mail, a status
 * or a role (those stay in the directory, members.read) — and the search is by name alone.
 */
export async function findPeopleToName(actor: Actor, q: string): Promise<IncidentPersonChoiceDto[]> {
  // The trigram index on lower(users.name) serves the LIKE.
  return useDb().query<IncidentPersonChoiceDto>(
    `SELECT m.id AS "membershipId", u.name FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.club_id = :clubId AND ${INVOLVED_MEMBER_SQL} AND lower(u.name) LIKE :pattern
      ORDER BY m.name_key, m.id LIMIT :limit`,
    { replacements: { clubId: actor.club.id, pattern: containsPattern(q), limit: PEOPLE_LIMIT }, type: QueryTypes.SELECT })
}

/**
 * Vessel `tag` of the actor's club — anyone's, since a report may name any vessel — with only what the
 * report form shows to check it is the right one (tag, name, state), or null.
 */
export async function vesselToReport(actor: Actor, tag: string): Promise<IncidentVesselDto | null> {
  const [v] = await useDb().query<{ tag: string, name: string, state: VesselState }>(
    'SELECT tag, name, state FROM vessels WHERE club_id = :clubId AND tag = :tag',
    { replacements: { clubId: actor.club.id, tag }, type: QueryTypes.SELECT })
  return v ? { tag: v.tag, name: v.name, state: v.state } : null
}
