import { QueryTypes } from 'sequelize'
import { Notice } from '../models'
import { sendMail } from '../utils/mail'

const BATCH = 50
const LOCK_SECONDS = 120
const MAX_BACKOFF_SECONDS = 6 * 3600

/** Seconds to wait before attempt `attempts + 1`: 30 s doubling per failure, capped at 6 h. */
export function backoffSeconds(attempts: number): number {
  return Math.min(MAX_BACKOFF_SECONDS, 30 * 2 ** Math.max(0, attempts - 1))
}

/**
 * Claims due notices so that two runs at once never take the same row (FOR UPDATE SKIP LOCKED),
 * marking them `sending` with a lease; a crashed run's lease expires and the row is taken again.
 */
async function claimDue(limit: number): Promise<Notice[]> {
  const rows = await useDb().query<{ id: string }>(`
    UPDATE notices SET status = 'sending', locked_until = now() + make_interval(secs => :lock), updated_at = now()
    WHERE id IN (
      SELECT id FROM notices
      WHERE (status = 'queued' AND next_attempt_at <= now())
         OR (status = 'sending' AND locked_until < now())
      ORDER BY next_attempt_at
      LIMIT :limit
      FOR UPDATE SKIP LOCKED
    )
    RETURNING id`, { replacements: { lock: LOCK_SECONDS, limit }, type: QueryTypes.SELECT })
  if (!rows.length) return []
  return Notice.findAll({ where: { id: rows.map(r => r.id) }, order: [['nextAttemptAt', 'ASC']] })
}

export interface QueueRun { sent: number, retried: number }

/**
 * Sends every due notice once. A notice whose send fails (mail server unreachable) goes back to
 * `queued` with a backoff; nothing is lost and nothing is sent twice.
 */
export async function runNoticeQueue(): Promise<QueueRun> {
  const result: QueueRun = { sent: 0, retried: 0 }
  for (;;) {
    const batch = await claimDue(BATCH)
    if (!batch.length) return result
    for (const notice of batch) {
      try {
        await sendMail({ to: notice.toEmail, subject: notice.subject, text: notice.textBody, html: notice.htmlBody })
        await notice.update({ status: 'sent', sentAt: new Date(), attempts: notice.attempts + 1, lockedUntil: null, lastError: null })
        result.sent += 1
      }
      catch (error) {
        const attempts = notice.attempts + 1
        await notice.update({
          status: 'queued',
          attempts,
          lockedUntil: null,
          lastError: (error as Error).message.slice(0, 500),
          nextAttemptAt: new Date(Date.now() + backoffSeconds(attempts) * 1000),
        })
        result.retried += 1
      }
    }
    if (result.retried) return result // the mail server is failing: stop this run, the backoff decides the next
  }
}

let running: Promise<QueueRun> | null = null

/** Starts a queue run in the background (after a notice is queued); one at a time per process. */
export function kickNoticeQueue(): void {
  if (running) return
  running = runNoticeQueue()
    .catch((error) => {
      console.error('[notices] queue run failed:', (error as Error).message)
      return { sent: 0, retried: 0 }
    })
    .finally(() => {
      running = null
    })
}
