import { listProofRequests } from '../../services/vessels'

/** Vessels whose owners asked for a proof test that may be recorded now: the instructors' queue. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'vessels.witness')
  return listProofRequests(actor.club.id)
})
