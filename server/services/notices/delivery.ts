/**
 * How the notice queue treats a failed send, in one pure module (unit-tested):
 * - the mail server cannot be reached (the connection, the DNS look-up or TLS fails — nothing of the
 *   message was handed over): the notice stays queued and is tried again after a backoff, however
 *   long the outage lasts; this is a deferral, not an attempt;
 * - anything else that carries no SMTP reply (a timeout in the middle of a conversation, a refused
 *   sign-in, a broken stream) and a 4xx reply (try later): an attempt, retried with backoff,
 *   `failed` after MAX_ATTEMPTS attempts;
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

// nodemailer's codes for a connection, DNS or TLS failure, and Node's own socket codes.
const UNREACHABLE_CODES = new Set(['ECONNECTION', 'ESOCKET', 'EDNS', 'ETLS', 'EREQUIRETLS', 'ECONNREFUSED',
  'ECONNRESET', 'EHOSTUNREACH', 'ENETUNREACH', 'ENOTFOUND', 'EAI_AGAIN'])
// Timeouts before the server has said hello (or while upgrading to TLS); a timeout later in the
// conversation may come after the message was handed over, so it counts as an attempt.
const SETUP_TIMEOUTS = new Set(['CONNECT_TIMEOUT', 'GREETING_TIMEOUT', 'UPGRADE_TIMEOUT'])

/**
 * Classifies a nodemailer error: only a connection, DNS or TLS failure (no SMTP reply) is
 * "unreachable"; otherwise the SMTP reply code decides (5xx permanent, else transient).
 */
export function classifySendError(error: unknown): SendFailure {
  const { responseCode, code, timeoutType } = (error ?? {}) as { responseCode?: unknown, code?: unknown, timeoutType?: unknown }
  const noReply = typeof responseCode !== 'number'
  if (noReply && typeof code === 'string' && UNREACHABLE_CODES.has(code)) return 'unreachable'
  if (noReply && code === 'ETIMEDOUT' && typeof timeoutType === 'string' && SETUP_TIMEOUTS.has(timeoutType)) return 'unreachable'
  // A refused sign-in is the server's configuration, not this message: never a permanent failure.
  if (noReply || code === 'EAUTH') return 'transient'
  return (responseCode as number) >= 500 ? 'permanent' : 'transient'
}

/** The status a notice takes after failed attempt number `attempts` with a failure of `kind`. */
export function statusAfterFailure(kind: SendFailure, attempts: number): 'queued' | 'failed' {
  if (kind === 'permanent') return 'failed'
  if (kind === 'transient' && attempts >= MAX_ATTEMPTS) return 'failed'
  return 'queued'
}

/** The transport's timeouts in milliseconds (nodemailer connectionTimeout, greetingTimeout, socketTimeout). */
export interface TransportTimeouts { connectionMs: number, greetingMs: number, socketMs: number }

/**
 * Seconds a claimed notice stays ours without renewal: twice the longest the transport waits
 * before it gives up on a server that has gone quiet (connecting, then the greeting, then one idle
 * socket), so a run whose renewal is held up by one such wait keeps its claim. `configured` (a
 * positive setting) overrides it. The queue renews the lease every third of it while a send is in
 * flight, so a server that answers slowly but steadily never outlives the claim.
 */
export function leaseSecondsFor(t: TransportTimeouts, configured = 0): number {
  if (configured > 0) return configured
  return Math.ceil((2 * (t.connectionMs + t.greetingMs + t.socketMs)) / 1000)
}

/** What the transport is told about TLS, or why it must not send at all. */
export type SmtpTlsDecision = { send: true, secure: boolean, requireTLS: boolean } | { send: false, reason: string }

/** Whether `host` names this machine: localhost, 127.0.0.0/8 or ::1 (also IPv4-mapped). */
export function isLoopbackHost(host: string): boolean {
  const h = host.trim().toLowerCase().replace(/^\[|\]$/g, '').replace(/\.$/, '')
  if (h === 'localhost') return true
  if (h === '::1' || h === '0:0:0:0:0:0:0:1') return true
  const v4 = h.replace(/^::ffff:/, '')
  return /^127(\.(25[0-5]|2[0-4]\d|1\d\d|[1-9]?\d)){3}$/.test(v4)
}

/**
 * SMTP to any other machine needs TLS: implicit TLS when `secure` (port 465), otherwise STARTTLS
 * that must succeed before the sign-in or the message is sent (nodemailer `requireTLS`). Only a
 * loopback host (a relay or a mail catcher on this machine) may speak plain SMTP. No host at all:
 * nothing is sent.
 */
export function smtpTlsDecision(host: string, secure: boolean): SmtpTlsDecision {
  if (!host.trim()) return { send: false, reason: 'No SMTP host is configured (NUXT_SMTP_HOST).' }
  if (isLoopbackHost(host)) return { send: true, secure, requireTLS: false }
  return secure ? { send: true, secure: true, requireTLS: false } : { send: true, secure: false, requireTLS: true }
}
