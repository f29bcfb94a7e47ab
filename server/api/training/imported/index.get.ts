import { unconfirmedRecords } from '../../../services/training'

/** The unconfirmed training records a roster import brought in (training.run confirms them). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  return unconfirmedRecords(actor)
})
