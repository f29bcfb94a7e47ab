import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockIncident } from '../../utils/locks'
import { recordAudit } from '../audit'
import { kickNoticeQueue } from '../notices'
import { changeTier } from '../tiers'
import type { IncidentCloseInput, IncidentReviewInput, IncidentSuspensionInput } from '#shared/schemas/incidents'
import type { IncidentDto } from '#shared/types/incidents'
import type { IncidentKind } from '#shared/utils/incident-words'
import type { TierRank } from '#shared/utils/tier-rules'
import type { MemberTiersDto } from '#shared/types/tiers'
import { queueIncidentClosed } from './notices'
import { incidentOr404 } from './read'

/** Locks incident `id` of the actor's club (404 if none) and refuses with 422 when it is closed already. */
async function openIncident(actor: Actor, id: string, transaction: Transaction) {
  const row = await lockIncident(actor.club.id, id, transaction)
  if (!row) notFound('No such incident')
  if (row.status === 'closed') refuse({ code: 'INCIDENT_CLOSED', message: 'The incident is closed: its review is kept as it was closed.' })
  return row
}

/** The safety officer changes the review notes, findings or actions of an open incident; audited by field names. */
export async function reviewIncident(actor: Actor, id: string, input: IncidentReviewInput): Promise<IncidentDto> {
  await inTransaction(async (transaction) => {
    await openIncident(actor, id, transaction)
    const columns = { reviewNotes: 'review_notes', findings: 'findings', actions: 'actions' } as const
    const changed = (Object.keys(columns) as (keyof typeof columns)[]).filter(k => input[k] !== undefined)
    await useDb().query(`UPDATE incidents SET ${changed.map(k => `${columns[k]} = :${k}`).join(', ')}, updated_at = now() WHERE id = :id`,
      { replacements: { id, ...Object.fromEntries(changed.map(k => [k, input[k]])) }, transaction })
    // Which fields changed, never their text (the audit trail is kept for good).
    await recordAudit(actor, actor.club.id, { action: 'incident.review', subjectType: 'incident', subjectId: id, after: { changed } }, transaction)
  })
  return incidentOr404(actor, id)
}

/**
 * The safety officer closes an open incident with its outcome (audited; the reporter is e-mailed).
 * Closing does NOT release a vessel the report quarantined: that is the quarantine's own release,
 * after which only a new passing proof test returns the vessel to service.
 */
export async function closeIncident(actor: Actor, id: string, input: IncidentCloseInput): Promise<IncidentDto> {
  await inTransaction(async (transaction) => {
    const row = await openIncident(actor, id, transaction)
    const [facts] = await useDb().query<{ kind: IncidentKind, place: string, happened_at: Date }>(
      `UPDATE incidents SET status = 'closed', closed_at = now(), closed_by_membership_id = :me, updated_at = now()
        WHERE id = :id RETURNING kind, place, happened_at`,
      { replacements: { id, me: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'incident.close', subjectType: 'incident', subjectId: id, before: { status: 'open' }, after: { status: 'closed' }, reason: input.outcome,
    }, transaction)
    await queueIncidentClosed(actor, { id, kind: facts!.kind, place: facts!.place, happenedAt: new Date(facts!.happened_at) }, row.reported_by_membership_id, input.outcome, transaction)
  })
  kickNoticeQueue()
  return incidentOr404(actor, id)
}

/**
 * The safety officer suspends tier `rank` of a person involved in open incident `id`, from the incident
 * page: the tiers' own suspension (audited, the member e-mailed) and, in the same transaction, the
 * incident's audit row naming it. Someone not named as involved is refused (422).
 */
export async function suspendTierFromIncident(actor: Actor, id: string, input: IncidentSuspensionInput): Promise<MemberTiersDto> {
  // Read first, without a lock, so a bad incident or person answers before any tier is touched.
  const incident = await incidentOr404(actor, id)
  if (incident.status === 'closed') refuse({ code: 'INCIDENT_CLOSED', message: 'The incident is closed: suspend the tier from the member\'s page.' })
  if (!incident.people.some(p => p.membershipId === input.membershipId)) refuse({ code: 'NOT_INVOLVED', message: 'Only the tiers of the people involved are suspended from the incident page.' })
  const reason = `${input.reason} (incident of ${incident.happenedAt.slice(0, 10)} at ${incident.place})`
  return changeTier(actor, input.membershipId, input.rank as TierRank, 'suspend', reason, async (transaction) => {
    // Memberships were locked first (step 1); the incident's lock is step 4.
    await openIncident(actor, id, transaction)
    await recordAudit(actor, actor.club.id, {
      action: 'incident.suspend_tier', subjectType: 'incident', subjectId: id, after: { membershipId: input.membershipId, rank: input.rank }, reason: input.reason,
    }, transaction)
  })
}
