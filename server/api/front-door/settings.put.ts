import { FrontDoorSchema } from '#shared/schemas/club'
import { updateFrontDoor } from '../../services/front-door'

/** The admin saves the club's name, the public page's texts and which sections visitors see; audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'club.edit')
  const input = await validBody(event, FrontDoorSchema)
  return updateFrontDoor(actor, input)
})
