import { runNoticeJob } from '../../services/notice-job'

// A request sends at most this many; a larger backlog goes on in the background.
const MAX_NOTICES_PER_REQUEST = 200

/** Runs the notice job now for the admin's club (reminder scans, then the queue); returns the counts. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'notices.manage')
  return runNoticeJob({ clubId: actor.club.id, maxNotices: MAX_NOTICES_PER_REQUEST })
})
