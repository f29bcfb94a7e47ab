/** What happened to a session or a sign-in, as written to the log. */
export type AuthOutcome = 'signed_in' | 'signed_out' | 'session_revoked' | 'sessions_revoked'

export interface AuthLogLine {
  /** The account's e-mail (lower case). */
  account: string
  /** The address of the request that caused it, or null when there was none. */
  address: string | null
  outcome: AuthOutcome
  /** Extra facts (why sessions were revoked, how many), never a secret. */
  [detail: string]: unknown
}

/**
 * Writes one JSON line to stdout for a sign-in, sign-out or revocation: time, account, address and
 * outcome, so a log collector can follow an account's sessions without parsing prose.
 */
export function logAuthEvent(line: AuthLogLine): void {
  const { account, address, outcome, ...details } = line
  console.log(JSON.stringify({ time: new Date().toISOString(), kind: 'auth', account: account.toLowerCase(), address, outcome, ...details }))
}
