import { IdParamSchema } from '#shared/schemas/common'
import { loadMemberDto } from '../../services/members'

/** One member's page: for officers with members.read, or the member themselves. 404 outside the club. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  if (id !== actor.membership.id && !actorCan(actor, 'members.read')) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'You do not have the right to do this (members.read)' })
  }
  const member = await loadMemberDto(actor.club.id, id)
  if (!member) notFound('No such member')
  return member
})
