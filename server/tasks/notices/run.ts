import { runNoticeJob } from '../../services/notices'

/** Scheduled in nuxt.config.ts (every 10 minutes): reminder scans for every club, then the queue. */
export default defineTask({
  meta: { name: 'notices:run', description: 'Queue due reminders and send every due notice' },
  async run() {
    const result = await runNoticeJob()
    if (result.queued || result.sent || result.retried || result.failed) console.info('[notices] run:', JSON.stringify(result))
    return { result }
  },
})
