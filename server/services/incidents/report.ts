import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import type { Reason } from '../../utils/errors'
import { recordAudit } from '../audit'
import { kickNoticeQueue } from '../notices'
import { quarantineForIncident } from '../vessels'
import type { IncidentReportInput } from '#shared/schemas/incidents'
import type { IncidentDto } from '#shared/types/incidents'
import { INCIDENT_KIND_WORDS } from '#shared/utils/incident-words'
import { dateInZone } from '#shared/utils/dates'
import { INVOLVED_MEMBER_SQL } from './lookups'
import { queueIncidentReported } from './notices'
import { incidentOr404 } from './read'

// A report's time comes from the reporter's clock: a few minutes ahead is a clock, not the future.
const CLOCK_SLACK_MS = 5 * 60_000

/**
 * Any signed-in member reports an incident. The people involved must be members of the club (approved,
 * not resigned: whom the form offers), the event one of its launch events, the vessel (by tag) any
 * vessel of the club. In ONE transaction: the
 * report and its people are written, the vessel is quarantined (it stays so whatever becomes of the
 * report, until the safety officer releases it), both are audited and every safety officer's e-mail is
 * queued. Answers the report as the reporter sees it.
 */
export async function reportIncident(actor: Actor, input: IncidentReportInput): Promise<IncidentDto> {
  const clubId = actor.club.id
  const happenedAt = new Date(input.happenedAt)
  if (happenedAt.getTime() > Date.now() + CLOCK_SLACK_MS) refuse({ code: 'INCIDENT_IN_FUTURE', message: 'Report what has happened: the time given is in the future.' })
  const id = await inTransaction(async (transaction) => {
    const reasons: Reason[] = []
    const found = input.peopleIds.length
      ? await useDb().query<{ id: string }>(`SELECT m.id FROM memberships m WHERE m.club_id = :clubId AND m.id IN (:ids) AND ${INVOLVED_MEMBER_SQL}`,
          { replacements: { clubId, ids: input.peopleIds }, type: QueryTypes.SELECT, transaction })
      : []
    if (found.length !== input.peopleIds.length) reasons.push({ code: 'PERSON_NOT_IN_CLUB', message: 'Everyone named as involved must be a member of the club.' })
    if (input.eventId) {
      const [e] = await useDb().query('SELECT 1 FROM launch_events WHERE id = :id AND club_id = :clubId', { replacements: { id: input.eventId, clubId }, type: QueryTypes.SELECT, transaction })
      if (!e) reasons.push({ code: 'NO_SUCH_EVENT', message: 'The club has no such launch event.' })
    }
    let vesselId: string | null = null
    if (input.vesselTag) {
      const [v] = await useDb().query<{ id: string }>('SELECT id FROM vessels WHERE club_id = :clubId AND tag = :tag', { replacements: { clubId, tag: input.vesselTag }, type: QueryTypes.SELECT, transaction })
      if (!v) reasons.push({ code: 'NO_SUCH_VESSEL', message: `The club has no vessel tagged ${input.vesselTag}: check the tag on the vessel.` })
      vesselId = v?.id ?? null
    }
    if (reasons.length) refuse(reasons)

    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO incidents (club_id, reported_by_membership_id, kind, happened_at, place, event_id, vessel_id, what_happened, injury_details)
       VALUES (:clubId, :me, :kind, :happenedAt, :place, :eventId, :vesselId, :whatHappened, :injuryDetails) RETURNING id`,
      { replacements: { clubId, me: actor.membership.id, kind: input.kind, happenedAt, place: input.place, eventId: input.eventId ?? null, vesselId, whatHappened: input.whatHappened, injuryDetails: input.kind === 'injury' ? input.injuryDetails ?? null : null }, type: QueryTypes.SELECT, transaction })
    const incidentId = row!.id
    for (const person of input.peopleIds) {
      await useDb().query('INSERT INTO incident_people (incident_id, club_id, membership_id) VALUES (:incidentId, :clubId, :person)',
        { replacements: { incidentId, clubId, person }, transaction })
    }
    const label = INCIDENT_KIND_WORDS[input.kind].label
    // Reported at once, held at once: the vessel is quarantined in this transaction, never later.
    const vessel = vesselId
      ? await quarantineForIncident(actor, clubId, vesselId, dateInZone(happenedAt, actor.club.timeZone), `Incident reported (${label.toLowerCase()}), incident ${incidentId}`, transaction)
      : null
    await recordAudit(actor, clubId, {
      action: 'incident.report', subjectType: 'incident', subjectId: incidentId, before: null,
      // People by id only, and never the injury's personal details: the trail is kept for good.
      after: { kind: input.kind, happenedAt: happenedAt.toISOString(), incidentEventId: input.eventId ?? null, incidentVesselId: vesselId, vesselQuarantined: vessel?.quarantined ?? false, peopleIds: input.peopleIds },
    }, transaction)
    await queueIncidentReported(actor, { id: incidentId, kind: input.kind, place: input.place, happenedAt, vesselTag: vesselId ? input.vesselTag ?? null : null }, transaction)
    return incidentId
  })
  kickNoticeQueue()
  return incidentOr404(actor, id)
}
