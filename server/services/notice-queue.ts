import { QueryTypes } from 'sequelize'
import { sendMail } from '../utils/mail'
import { NOTICE_KINDS, isNoticeKind } from './notice-kinds'
import { oneClickOptOutUrl } from './notice-opt-out'
import { SCRUB_LINKS_SQL, optOutSecret } from './notices'
import { clubBaseUrl } from './clubs'
import { backoffSeconds, classifySendError, statusAfterFailure } from './notice-policy'

// Small batches and a long lease: even at the transport's worst timeouts (5 s to connect, 10 s per
// socket) a batch is done before its lease runs out, so no other run takes a row still being sent.
const BATCH = 10
const LEASE_SECONDS = 300

interface ClaimedNotice {
  id: string
  membership_id: string
  kind: string
  to_email: string
  subject: string
  text_body: string
  html_body: string
  attempts: number
  opt_outs: string[]
  public_url: string
}

/**
 * Claims due notices so that two runs at once never take the same row (FOR UPDATE SKIP LOCKED),
 * marking them `sending` with a lease; a crashed run's lease expires and the row is taken again.
 * With `clubId`, only that club's notices.
 */
async function claimDue(limit: number, clubId?: string): Promise<ClaimedNotice[]> {
  return useDb().query<ClaimedNotice>(`
    WITH claimed AS (
      UPDATE notices SET status = 'sending', locked_until = now() + make_interval(secs => :lease), updated_at = now()
      WHERE id IN (
        SELECT id FROM notices
        WHERE ((status = 'queued' AND next_attempt_at <= now()) OR (status = 'sending' AND locked_until < now()))
          ${clubId ? 'AND club_id = :clubId' : ''}
        ORDER BY next_attempt_at
        LIMIT :limit
        FOR UPDATE SKIP LOCKED
      )
      RETURNING id, membership_id, club_id, kind, to_email, subject, text_body, html_body, attempts, next_attempt_at
    )
    SELECT c.*, m.notice_opt_outs AS opt_outs, cl.public_url
    FROM claimed c JOIN memberships m ON m.id = c.membership_id JOIN clubs cl ON cl.id = c.club_id
    ORDER BY c.next_attempt_at`, { replacements: { lease: LEASE_SECONDS, limit, clubId }, type: QueryTypes.SELECT })
}

/** What one queue run did: sent, put back for a later try, given up on, or skipped (opted out). */
export interface QueueRun { sent: number, retried: number, failed: number, skipped: number }

async function finish(id: string, set: string, replacements: Record<string, unknown> = {}): Promise<void> {
  await useDb().query(`UPDATE notices SET ${set}, locked_until = NULL, updated_at = now() WHERE id = :id AND status = 'sending'`,
    { replacements: { ...replacements, id } })
}

/** Headers that let a mail program offer one-click opt-out (RFC 2369 and RFC 8058) for optional kinds. */
function listHeaders(n: ClaimedNotice): Record<string, string> | undefined {
  if (!isNoticeKind(n.kind) || !NOTICE_KINDS[n.kind].optional) return undefined
  const url = oneClickOptOutUrl(optOutSecret(), clubBaseUrl({ publicUrl: n.public_url }), n.membership_id, n.kind)
  return { 'List-Unsubscribe': `<${url}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' }
}

/** Settles a notice the member opted out of after it was queued (its link blanked like any other). */
const skipOptedOut = (n: ClaimedNotice) =>
  finish(n.id, `${SCRUB_LINKS_SQL}, status = 'skipped', last_error = 'The member opted out of this kind'`)

const optedOut = (n: ClaimedNotice) => isNoticeKind(n.kind) && NOTICE_KINDS[n.kind].optional && n.opt_outs.includes(n.kind)

/** Records a failed attempt on `notice`; returns the status it took. */
async function recordFailure(notice: ClaimedNotice, error: unknown, message: string): Promise<'queued' | 'failed'> {
  const attempts = notice.attempts + 1
  const status = statusAfterFailure(classifySendError(error), attempts)
  // A notice given up on keeps no usable one-time link.
  await finish(notice.id, `${status === 'failed' ? `${SCRUB_LINKS_SQL}, ` : ''}status = :status, attempts = :attempts, last_error = :message,
    next_attempt_at = now() + make_interval(secs => :wait)`, { status, attempts, message: message.slice(0, 500), wait: backoffSeconds(attempts) })
  return status
}

/**
 * Sends every due notice once (only club `clubId`'s when given). A send that fails because the mail
 * server cannot be reached puts the notice — and the rest of its batch — back in the queue with a
 * backoff and ends the run: nothing is lost and nothing is sent twice. A permanent rejection (5xx)
 * marks it `failed`; a member who opted out after it was queued makes it `skipped`. A sent, skipped
 * or failed notice with a one-time link has the link's token blanked in its stored bodies.
 */
export async function runNoticeQueue(opts: { clubId?: string, maxNotices?: number } = {}): Promise<QueueRun> {
  const result: QueueRun = { sent: 0, retried: 0, failed: 0, skipped: 0 }
  let handled = 0
  for (;;) {
    // A bounded run (the outbox's "run now") leaves the rest to the background run it kicks.
    if (opts.maxNotices !== undefined && handled >= opts.maxNotices) {
      kickNoticeQueue()
      return result
    }
    const batch = await claimDue(BATCH, opts.clubId)
    if (!batch.length) return result
    handled += batch.length
    for (const [index, notice] of batch.entries()) {
      if (optedOut(notice)) {
        await skipOptedOut(notice)
        result.skipped += 1
        continue
      }
      try {
        await sendMail({ to: notice.to_email, subject: notice.subject, text: notice.text_body, html: notice.html_body, headers: listHeaders(notice) })
        await finish(notice.id, `${SCRUB_LINKS_SQL}, status = 'sent', sent_at = now(), attempts = attempts + 1, last_error = NULL`)
        result.sent += 1
      }
      catch (error) {
        const message = (error as Error).message ?? String(error)
        if (classifySendError(error) !== 'unreachable') {
          result[await recordFailure(notice, error, message) === 'failed' ? 'failed' : 'retried'] += 1
          continue
        }
        // The server is down: the rest of this batch would fail the same way; try them all later
        // (an opted-out one is settled now: it will never be sent).
        for (const rest of batch.slice(index)) {
          if (optedOut(rest)) {
            await skipOptedOut(rest)
            result.skipped += 1
            continue
          }
          await recordFailure(rest, error, `Mail server unreachable: ${message}`)
          result.retried += 1
        }
        return result
      }
    }
  }
}

let running: Promise<QueueRun> | null = null
let again = false

/**
 * Starts a queue run in the background (after a notice is queued); one at a time per process. A kick
 * during a run asks for one more run after it, so a notice queued just as a run ends is not left
 * waiting for the scheduled task.
 */
export function kickNoticeQueue(): void {
  if (running) {
    again = true
    return
  }
  running = runNoticeQueue()
    .catch((error) => {
      console.error('[notices] queue run failed:', (error as Error).message)
      return { sent: 0, retried: 0, failed: 0, skipped: 0 }
    })
    .finally(() => {
      running = null
      if (again) {
        again = false
        kickNoticeQueue()
      }
    })
}
