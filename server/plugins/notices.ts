import { runNoticeJob } from '../services/notices'

/**
 * Runs the notice job once shortly after boot, so reminders due while the server was down go out
 * without waiting for the next scheduled run. Test servers skip it (as Nitro skips the schedule
 * there) so tests decide when the job runs.
 */
export default defineNitroPlugin(() => {
  if (process.env.TEST) return
  const timer = setTimeout(() => {
    runNoticeJob().catch(error => console.error('[notices] run at boot failed:', (error as Error).message))
  }, 5000)
  timer.unref()
})
