import { frontDoorSettings } from '../../services/front-door'

/** The admin's front-door settings, as the edit form starts from them. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'club.edit')
  return frontDoorSettings(actor.club.id)
})
