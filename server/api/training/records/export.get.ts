import { RecordListQuerySchema } from '#shared/schemas/training'
import { isClubMember } from '../../../services/training'
import { trainingRecordsExport } from '../../../services/club-data'

/**
 * Training records as a CSV download: the caller's own; an officer (training.run, training.flag or
 * members.read) names a member, or leaves the member out for the whole club's. Anyone else naming another gets 404.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { membershipId } = validQuery(event, RecordListQuerySchema)
  const officer = actorCan(actor, 'training.run') || actorCan(actor, 'training.flag') || actorCan(actor, 'members.read')
  if (membershipId && membershipId !== actor.membership.id && (!officer || !(await isClubMember(actor.club.id, membershipId)))) notFound('No such member')
  const { header, rows } = await trainingRecordsExport(actor.club.id, membershipId ?? (officer ? undefined : actor.membership.id))
  return sendCsv(event, 'training-records.csv', header, rows)
})
