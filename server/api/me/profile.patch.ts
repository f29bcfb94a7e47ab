import { ProfileSchema } from '#shared/schemas/member'
import { updateProfile } from '../../services/members'

/**
 * Edit my own profile: name, phone, emergency contact, unit preference. Contact details are not
 * audited (they are my own); a new name is, without either name. The session's name follows so the
 * header shows the new one at once.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const profile = await validBody(event, ProfileSchema)
  const member = (await updateProfile(actor, profile)) ?? notFound()
  await renameInSession(event, member.name)
  return member
})
