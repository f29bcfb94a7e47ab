import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice } from '../notices'
import { INCIDENT_KIND_WORDS, type IncidentKind } from '#shared/utils/incident-words'
import { dateInZone } from '#shared/utils/dates'

interface IncidentFacts { id: string, kind: IncidentKind, place: string, happenedAt: Date }

const factVars = (actor: Actor, i: IncidentFacts) => ({
  clubName: actor.club.name, baseUrl: clubBaseUrl(actor.club), incidentId: i.id,
  kindLabel: INCIDENT_KIND_WORDS[i.kind].label, place: i.place, happenedOn: dateInZone(i.happenedAt, actor.club.timeZone),
})

/**
 * Queues the e-mail about a new incident to every safety officer of the club who keeps their rights
 * (a safety kind: nobody opts out), inside the report's `transaction`. It names no personal details.
 */
export async function queueIncidentReported(actor: Actor, i: IncidentFacts & { vesselTag: string | null }, transaction: Transaction): Promise<void> {
  const officers = await useDb().query<{ id: string, email: string, name: string }>(
    `SELECT m.id, u.email, u.name FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.club_id = :clubId AND m.roles @> ARRAY['safety_officer']::text[] AND m.suspended_at IS NULL AND m.resigned_at IS NULL`,
    { replacements: { clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
  for (const o of officers) {
    await enqueueNotice({
      clubId: actor.club.id, membershipId: o.id, kind: 'incident_reported', subjectKey: i.id, dueOn: clubToday(actor.club), toEmail: o.email,
      vars: { ...factVars(actor, i), memberName: o.name, reporterName: actor.user.name, vesselTag: i.vesselTag ?? '' },
    }, transaction)
  }
}

/** Queues the e-mail to the reporter `reporterId` that their incident is closed, with its outcome. */
export async function queueIncidentClosed(actor: Actor, i: IncidentFacts, reporterId: string, outcome: string, transaction: Transaction): Promise<void> {
  const [reporter] = await useDb().query<{ email: string, name: string }>(
    'SELECT u.email, u.name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = :reporterId',
    { replacements: { reporterId }, type: QueryTypes.SELECT, transaction })
  if (!reporter) return
  await enqueueNotice({
    clubId: actor.club.id, membershipId: reporterId, kind: 'incident_closed', subjectKey: i.id, dueOn: clubToday(actor.club), toEmail: reporter.email,
    vars: { ...factVars(actor, i), memberName: reporter.name, outcome },
  }, transaction)
}
