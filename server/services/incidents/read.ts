import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import type { IncidentDto, IncidentListItemDto } from '#shared/types/incidents'
import type { Paged } from '#shared/types/common'
import type { IncidentListQuery } from '#shared/schemas/incidents'
import type { IncidentKind, IncidentStatus } from '#shared/utils/incident-words'
import { incidentAccess } from './access'

interface ListRow {
  id: string
  kind: IncidentKind
  status: IncidentStatus
  happened_at: Date
  place: string
  vessel_id: string | null
  vessel_tag: string | null
  reporter_id: string
  reporter_name: string
  people_count: number
}

const LIST_COLUMNS = `i.id, i.kind, i.status, i.happened_at, i.place, i.vessel_id, v.tag AS vessel_tag,
  i.reported_by_membership_id AS reporter_id, ru.name AS reporter_name,
  (SELECT count(*)::int FROM incident_people p WHERE p.incident_id = i.id) AS people_count`
const LIST_FROM = `FROM incidents i
  JOIN memberships rm ON rm.id = i.reported_by_membership_id JOIN users ru ON ru.id = rm.user_id
  LEFT JOIN vessels v ON v.id = i.vessel_id`

const listItem = (r: ListRow): IncidentListItemDto => ({
  id: r.id, kind: r.kind, status: r.status, happenedAt: new Date(r.happened_at).toISOString(), place: r.place,
  vessel: r.vessel_id ? { id: r.vessel_id, tag: r.vessel_tag ?? '' } : null,
  reporter: { membershipId: r.reporter_id, name: r.reporter_name }, peopleCount: r.people_count,
})

/**
 * The incidents `actor` may see, newest first, one page: officers (incidents.review, audit.read) see
 * every report of the club, anyone else their own reports only; optionally only those of one status
 * or naming one person as involved (the member page's link).
 */
export async function listIncidents(actor: Actor, q: IncidentListQuery): Promise<Paged<IncidentListItemDto>> {
  const access = incidentAccess(actor)
  const where = ['i.club_id = :clubId']
  if (!access.all) where.push('i.reported_by_membership_id = :me')
  if (q.status) where.push('i.status = :status')
  if (q.person) where.push('EXISTS (SELECT 1 FROM incident_people p WHERE p.incident_id = i.id AND p.membership_id = :person)')
  const replacements = { clubId: actor.club.id, me: actor.membership.id, status: q.status ?? null, person: q.person ?? null, limit: q.pageSize, offset: (q.page - 1) * q.pageSize }
  const rows = await useDb().query<ListRow & { total: number }>(
    `SELECT ${LIST_COLUMNS}, count(*) OVER ()::int AS total ${LIST_FROM} WHERE ${where.join(' AND ')}
      ORDER BY i.happened_at DESC, i.id LIMIT :limit OFFSET :offset`,
    { replacements, type: QueryTypes.SELECT })
  let total = rows[0]?.total ?? 0
  if (!rows.length && q.page > 1) {
    const [c] = await useDb().query<{ n: number }>(`SELECT count(*)::int AS n FROM incidents i WHERE ${where.join(' AND ')}`, { replacements, type: QueryTypes.SELECT })
    total = c?.n ?? 0
  }
  return { items: rows.map(listItem), page: q.page, pageSize: q.pageSize, total }
}

interface DetailRow extends ListRow {
  event_id: string | null
  event_held_on: string | null
  event_site: string | null
  vessel_state: string | null
  what_happened: string
  injury_details: string | null
  review_notes: string
  findings: string
  actions: string
  closed_at: Date | null
  closed_by_id: string | null
  closed_by_name: string | null
  created_at: Date
  people: { membershipId: string, name: string }[] | null
  photos: { id: string, caption: string | null }[] | null
}

/**
 * Incident `id` as `actor` may see it, or null (404) when it is not theirs to see: the reporter and
 * the officers read it; the personal details of an injury only the safety officer (incidents.review).
 */
export async function getIncident(actor: Actor, id: string, transaction?: Transaction): Promise<IncidentDto | null> {
  const access = incidentAccess(actor)
  const [r] = await useDb().query<DetailRow>(
    `SELECT ${LIST_COLUMNS}, i.event_id, e.held_on::text AS event_held_on, e.site AS event_site, v.state AS vessel_state,
            i.what_happened, i.injury_details, i.review_notes, i.findings, i.actions, i.closed_at, i.created_at,
            i.closed_by_membership_id AS closed_by_id, cu.name AS closed_by_name,
            (SELECT json_agg(json_build_object('membershipId', p.membership_id, 'name', pu.name) ORDER BY pu.name, p.membership_id)
               FROM incident_people p JOIN memberships pm ON pm.id = p.membership_id JOIN users pu ON pu.id = pm.user_id
              WHERE p.incident_id = i.id) AS people,
            (SELECT json_agg(json_build_object('id', ph.id, 'caption', ph.caption) ORDER BY ph.created_at, ph.id)
               FROM photos ph WHERE ph.incident_id = i.id) AS photos
       ${LIST_FROM}
       LEFT JOIN launch_events e ON e.id = i.event_id
       LEFT JOIN memberships cm ON cm.id = i.closed_by_membership_id LEFT JOIN users cu ON cu.id = cm.user_id
      WHERE i.id = :id AND i.club_id = :clubId AND (:all OR i.reported_by_membership_id = :me)`,
    { replacements: { id, clubId: actor.club.id, all: access.all, me: actor.membership.id }, type: QueryTypes.SELECT, transaction })
  if (!r) return null
  return {
    ...listItem(r),
    event: r.event_id ? { id: r.event_id, heldOn: r.event_held_on ?? '', site: r.event_site ?? '' } : null,
    vesselState: r.vessel_state,
    people: r.people ?? [],
    whatHappened: r.what_happened,
    injuryDetailsGiven: r.injury_details !== null,
    injuryDetails: access.injury ? r.injury_details : null,
    reviewNotes: r.review_notes,
    findings: r.findings,
    actions: r.actions,
    closedAt: r.closed_at ? new Date(r.closed_at).toISOString() : null,
    closedBy: r.closed_by_id ? { membershipId: r.closed_by_id, name: r.closed_by_name ?? '' } : null,
    photos: (r.photos ?? []).map(p => ({ id: p.id, caption: p.caption, url: `/api/photos/${p.id}`, thumbnailUrl: `/api/photos/${p.id}/thumbnail` })),
    canReview: access.review && r.status === 'open',
    createdAt: new Date(r.created_at).toISOString(),
  }
}

/** Incident `id` for `actor`, or 404. */
export async function incidentOr404(actor: Actor, id: string, transaction?: Transaction): Promise<IncidentDto> {
  const incident = await getIncident(actor, id, transaction)
  if (!incident) notFound('No such incident')
  return incident
}
