import { IdParamSchema } from '#shared/schemas/common'
import { clubToday } from '../../../../services/clubs'
import { memberTierStanding } from '../../../../services/tiers'

/** A member's tiers, states, caps, expiry and the next tier's gaps: officers with members.read, and the member. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  if (id !== actor.membership.id && !actorCan(actor, 'members.read')) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'You do not have the right to do this (members.read)' })
  }
  return (await memberTierStanding(actor.club.id, id, clubToday(actor.club))) ?? notFound('No such member')
})
