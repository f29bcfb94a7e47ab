/**
 * How the notice queue treats a failed send, in one pure module (unit-tested):
 * - the mail server cannot be reached (no SMTP reply, refused connection, failed sign-in): the
 *   notice stays queued and is tried again after a backoff, however long the outage lasts;
 * - the server answers 4xx (try later) for this message: retried with backoff, `failed` after
 *   MAX_ATTEMPTS attempts;
 * - the server answers 5xx (permanent rejection, e.g. no such mailbox): `failed` at once.
 * An admin can put a failed notice back in the queue from the outbox.
 */
export const MAX_ATTEMPTS = 10
export const BACKOFF_BASE_SECONDS = 30
export const MAX_BACKOFF_SECONDS = 6 * 3600

export type SendFailure = 'unreachable' | 'transient' | 'permanent'

/** Seconds to wait before attempt `attempts + 1`: 30 s doubling per failure, capped at 6 h. */
export function backoffSeconds(attempts: number): number {
  return Math.min(MAX_BACKOFF_SECONDS, BACKOFF_BASE_SECONDS * 2 ** Math.max(0, attempts - 1))
}

/** Classifies a nodemailer error by its SMTP reply code (none at all: the server was not reached). */
export function classifySendError(error: unknown): SendFailure {
  const { responseCode, code } = (error ?? {}) as { responseCode?: unknown, code?: unknown }
  // A refused sign-in is the server's configuration, not this message: wait for it to be fixed.
  if (code === 'EAUTH' || typeof responseCode !== 'number') return 'unreachable'
  return responseCode >= 500 ? 'permanent' : 'transient'
}

/** The status a notice takes after failed attempt number `attempts` with a failure of `kind`. */
export function statusAfterFailure(kind: SendFailure, attempts: number): 'queued' | 'failed' {
  if (kind === 'permanent') return 'failed'
  if (kind === 'transient' && attempts >= MAX_ATTEMPTS) return 'failed'
  return 'queued'
}
