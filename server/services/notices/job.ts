import type { NoticeRunDto } from '#shared/types/notices'
import { runNoticeScans } from './scans'
import { runNoticeQueue } from './queue'

/**
 * The notice job: the reminder scans, then the queue. Shared by the scheduled task (every club) and
 * the outbox's "run now" (the admin's club). Safe to run twice at once: scans are idempotent and the
 * queue claims rows with SKIP LOCKED.
 */
export async function runNoticeJob(opts: { clubId?: string, now?: Date, maxNotices?: number } = {}): Promise<NoticeRunDto> {
  const queued = await runNoticeScans(opts)
  const run = await runNoticeQueue({ clubId: opts.clubId, maxNotices: opts.maxNotices })
  return { queued, ...run }
}
