import { myCourses } from '../../../services/training'

/** Every course of the club with where the signed-in member stands in it (current, expiring, expired, retraining required, never taken). */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return myCourses(actor)
})
