import { VesselRegistrationSchema } from '#shared/schemas/vessel'
import { registerVessel } from '../../services/vessels'

/** A member registers one of their own vessels; the club assigns its tag. 201 with the vessel. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const input = await validBody(event, VesselRegistrationSchema)
  const vessel = await registerVessel({ clubId: actor.club.id, membershipId: actor.membership.id, name: actor.user.name }, input)
  setResponseStatus(event, 201)
  return vessel
})
