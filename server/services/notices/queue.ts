import { QueryTypes } from 'sequelize'
import { sendMail, transportTimeouts } from '../../utils/mail'
import { NOTICE_KINDS, isNoticeKind } from './kinds'
import { oneClickOptOutUrl } from './opt-out'
import { SCRUB_LINKS_SQL, optOutSecret } from './notices'
import { clubBaseUrl } from '../clubs'
import { backoffSeconds, classifySendError, leaseSecondsFor, statusAfterFailure } from './delivery'

/*
 * Exactly once, also when the mail server is slow:
 * - A run claims ONE notice at a time, just before sending it, writing a fresh `claim_id` and a
 *   lease; while the send is in flight the lease is renewed every third of its length, so a server
 *   that answers slower than the lease does not let another run take the row.
 * - Every later write to the row is `WHERE claim_id = mine`: a run never settles another's claim.
 * - Once the server has accepted the message, "sent" is written in a retry loop (the lease is still
 *   being renewed); if that keeps failing it is logged loudly and the row stays `sending`.
 * - A row still `sending` when its lease has run out belonged to a run that stopped (or could not
 *   write) between claiming and recording the outcome: the message may have gone out. It is never
 *   sent again automatically — it is marked `failed` with a message saying so, and an admin decides
 *   from the outbox. The claim stays, so the run that held it can still record the true outcome.
 * At most one notice per run is ever in that doubt, because a run holds one claim at a time.
 */

/** The lease of one claim in seconds (NUXT_NOTICE_LEASE_SECONDS, or sized from the SMTP timeouts). */
function leaseSeconds(): number {
  return leaseSecondsFor(transportTimeouts(), Number(useRuntimeConfig().noticeLeaseSeconds))
}

export const IN_DOUBT_MESSAGE = 'Sending was interrupted before its outcome was recorded; it may have arrived. '
  + 'It is not sent again automatically: retry it from the outbox if the member did not get it.'

interface ClaimedNotice {
  id: string
  claim_id: string
  membership_id: string
  club_id: string
  kind: string
  to_email: string
  subject: string
  text_body: string
  html_body: string
  attempts: number
  deferrals: number
  opt_outs: string[]
  public_url: string
}

/** Marks `sending` rows whose lease ran out as failed in doubt (see above); with `clubId`, only that club's. */
async function settleAbandoned(clubId?: string): Promise<void> {
  const rows = await useDb().query<{ id: string }>(`
    UPDATE notices SET ${SCRUB_LINKS_SQL}, status = 'failed', last_error = :message, locked_until = NULL, updated_at = now()
    WHERE status = 'sending' AND locked_until < now() ${clubId ? 'AND club_id = :clubId' : ''}
    RETURNING id`, { replacements: { message: IN_DOUBT_MESSAGE, clubId }, type: QueryTypes.SELECT })
  for (const row of rows) console.error(`[notices] notice ${row.id} was left sending past its lease; marked failed, not sent again`)
}

/**
 * Claims the next due notice so that two runs at once never take the same row (FOR UPDATE SKIP
 * LOCKED), marking it `sending` under a fresh claim id and a lease. With `clubId`, only that club's.
 * This claim stands outside the lock order of utils/locks.ts: it never waits and holds no other lock.
 */
async function claimNext(clubId?: string): Promise<ClaimedNotice | undefined> {
  const [notice] = await useDb().query<ClaimedNotice>(`
    WITH claimed AS (
      UPDATE notices SET status = 'sending', claim_id = gen_random_uuid(),
        locked_until = now() + make_interval(secs => :lease), updated_at = now()
      WHERE id = (
        SELECT id FROM notices
        WHERE status = 'queued' AND next_attempt_at <= now() ${clubId ? 'AND club_id = :clubId' : ''}
        ORDER BY next_attempt_at
        LIMIT 1
        FOR UPDATE SKIP LOCKED
      )
      RETURNING id, claim_id, membership_id, club_id, kind, to_email, subject, text_body, html_body, attempts, deferrals
    )
    SELECT c.*, m.notice_opt_outs AS opt_outs, cl.public_url
    FROM claimed c JOIN memberships m ON m.id = c.membership_id JOIN clubs cl ON cl.id = c.club_id`,
  { replacements: { lease: leaseSeconds(), clubId }, type: QueryTypes.SELECT })
  return notice
}

/** Renews `n`'s lease every third of it until stopped; a renewal that finds the claim gone is logged. */
function keepLease(n: ClaimedNotice): () => void {
  const lease = leaseSeconds()
  const timer = setInterval(() => {
    useDb().query<{ id: string }>(`UPDATE notices SET locked_until = now() + make_interval(secs => :lease)
      WHERE id = :id AND claim_id = :claim AND status = 'sending' RETURNING id`,
    { replacements: { lease, id: n.id, claim: n.claim_id }, type: QueryTypes.SELECT })
      .then((rows) => {
        if (!rows.length) console.error(`[notices] lost the lease of notice ${n.id} while sending it`)
      })
      .catch((error: unknown) => console.error(`[notices] could not renew the lease of notice ${n.id}:`, (error as Error).message))
  }, Math.max(100, (lease * 1000) / 3))
  return () => clearInterval(timer)
}

/** What one queue run did: sent, put back for a later try, given up on, or skipped (opted out). */
export interface QueueRun { sent: number, retried: number, failed: number, skipped: number }

/** Settles claimed notice `n` with the SET clause `set` — only while the claim is still `n`'s. */
async function finish(n: ClaimedNotice, set: string, replacements: Record<string, unknown> = {}): Promise<number> {
  const rows = await useDb().query<{ id: string }>(`UPDATE notices SET ${set}, locked_until = NULL, updated_at = now()
    WHERE id = :id AND claim_id = :claim RETURNING id`,
  { replacements: { ...replacements, id: n.id, claim: n.claim_id }, type: QueryTypes.SELECT })
  return rows.length
}

const SENT_WRITE_WAITS_MS = [0, 250, 1000, 2000, 4000, 8000]

/**
 * Records that the server accepted `n`. Never throws and never lets the notice be sent again: a
 * failing write is retried; if it keeps failing the row stays `sending` (later settled as failed in
 * doubt, never re-sent) and the log says loudly that it went out.
 */
async function recordSent(n: ClaimedNotice): Promise<void> {
  let lastError: unknown
  for (const wait of SENT_WRITE_WAITS_MS) {
    if (wait) await new Promise(resolve => setTimeout(resolve, wait))
    try {
      const settled = await finish(n, `${SCRUB_LINKS_SQL}, status = 'sent', sent_at = now(), attempts = attempts + 1, last_error = NULL`)
      if (!settled) console.error(`[notices] notice ${n.id} was sent, but its claim had been replaced; left as it is`)
      return
    }
    catch (error) {
      lastError = error
    }
  }
  console.error(`[notices] NOTICE ${n.id} WAS SENT but recording it failed; it will not be sent again `
    + `and will show as failed in the outbox:`, (lastError as Error)?.message)
}

/** Headers that let a mail program offer one-click opt-out (RFC 2369 and RFC 8058) for optional kinds. */
function listHeaders(n: ClaimedNotice): Record<string, string> | undefined {
  if (!isNoticeKind(n.kind) || !NOTICE_KINDS[n.kind].optional) return undefined
  const url = oneClickOptOutUrl(optOutSecret(), clubBaseUrl({ publicUrl: n.public_url }), n.membership_id, n.kind)
  return { 'List-Unsubscribe': `<${url}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' }
}

const optedOut = (n: ClaimedNotice) => isNoticeKind(n.kind) && NOTICE_KINDS[n.kind].optional && n.opt_outs.includes(n.kind)

/** Records a failed attempt on `n`; returns the status it took. */
async function recordFailure(n: ClaimedNotice, error: unknown, message: string): Promise<'queued' | 'failed'> {
  const attempts = n.attempts + 1
  const status = statusAfterFailure(classifySendError(error), attempts)
  // A notice given up on keeps no usable one-time link.
  await finish(n, `${status === 'failed' ? `${SCRUB_LINKS_SQL}, ` : ''}status = :status, attempts = :attempts, last_error = :message,
    next_attempt_at = now() + make_interval(secs => :wait)`, { status, attempts, message: message.slice(0, 500), wait: backoffSeconds(attempts) })
  return status
}

/**
 * The mail server cannot be reached: puts `n` back in the queue and defers every other due notice
 * (of the club, when given) by the same backoff — they would fail the same way. Not an attempt.
 * Returns how many were deferred.
 */
async function deferForOutage(n: ClaimedNotice, message: string, clubId?: string): Promise<number> {
  const deferrals = n.deferrals + 1
  const replacements = { message: `Mail server unreachable: ${message}`.slice(0, 500), wait: backoffSeconds(deferrals), clubId }
  const set = `deferrals = deferrals + 1, last_error = :message, next_attempt_at = now() + make_interval(secs => :wait)`
  await finish(n, `status = 'queued', ${set}`, replacements)
  const others = await useDb().query<{ id: string }>(`UPDATE notices SET ${set}, updated_at = now()
    WHERE status = 'queued' AND next_attempt_at <= now() ${clubId ? 'AND club_id = :clubId' : ''} RETURNING id`,
  { replacements, type: QueryTypes.SELECT })
  return 1 + others.length
}

/**
 * Sends every due notice once (only club `clubId`'s when given), one claim at a time. A send that
 * fails because the mail server cannot be reached defers the due notices with a backoff and ends
 * the run: nothing is lost and nothing is sent twice. A permanent rejection (5xx) marks it
 * `failed`; a member who opted out after it was queued makes it `skipped`. A sent, skipped or
 * failed notice with a one-time link has the link's token blanked in its stored bodies.
 */
export async function runNoticeQueue(opts: { clubId?: string, maxNotices?: number } = {}): Promise<QueueRun> {
  const result: QueueRun = { sent: 0, retried: 0, failed: 0, skipped: 0 }
  await settleAbandoned(opts.clubId)
  for (let handled = 0; ; handled += 1) {
    // A bounded run (the outbox's "run now") leaves the rest to the background run it kicks.
    if (opts.maxNotices !== undefined && handled >= opts.maxNotices) {
      kickNoticeQueue()
      return result
    }
    const notice = await claimNext(opts.clubId)
    if (!notice) return result
    if (optedOut(notice)) {
      await finish(notice, `${SCRUB_LINKS_SQL}, status = 'skipped', last_error = 'The member opted out of this kind'`)
      result.skipped += 1
      continue
    }
    const stopRenewing = keepLease(notice)
    try {
      let failure: unknown
      try {
        await sendMail({ to: notice.to_email, subject: notice.subject, text: notice.text_body, html: notice.html_body, headers: listHeaders(notice) })
      }
      catch (error) {
        failure = error ?? new Error('unknown send failure')
      }
      // The bookkeeping stays outside the send's error path: a failed write after a send that
      // went through must never be taken for a failed send (and so never re-send).
      if (failure === undefined) {
        await recordSent(notice)
        result.sent += 1
        continue
      }
      const message = (failure as Error).message ?? String(failure)
      if (classifySendError(failure) === 'unreachable') {
        result.retried += await deferForOutage(notice, message, opts.clubId)
        return result
      }
      result[await recordFailure(notice, failure, message) === 'failed' ? 'failed' : 'retried'] += 1
    }
    finally {
      stopRenewing()
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
