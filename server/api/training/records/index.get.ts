import { RecordListQuerySchema } from '#shared/schemas/training'
import { isClubMember, memberRecords } from '../../../services/training'

/**
 * A member's training records with their evidence: the caller's own, or (training.run, training.flag
 * or members.read) another member's; anyone else naming another member gets 404.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { membershipId = actor.membership.id } = validQuery(event, RecordListQuerySchema)
  const officer = actorCan(actor, 'training.run') || actorCan(actor, 'training.flag') || actorCan(actor, 'members.read')
  if (membershipId !== actor.membership.id && (!officer || !(await isClubMember(actor.club.id, membershipId)))) notFound('No such member')
  return memberRecords(actor.club.id, membershipId)
})
