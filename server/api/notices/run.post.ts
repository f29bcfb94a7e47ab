import { runNoticeJob } from '../../services/notice-job'

/** Runs the notice job now for the admin's club (reminder scans, then the queue); returns the counts. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'notices.manage')
  return runNoticeJob({ clubId: actor.club.id })
})
