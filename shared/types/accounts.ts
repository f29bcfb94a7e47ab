import type { SessionUser } from './session'

/** Plain objects the account routes return (sign-up, verification, password reset, guardian consent). */

export interface SignupResultDto {
  /** The new member, already signed in. */
  user: SessionUser
  /** Where the verification link went. */
  verificationSentTo: string
  /** Where the guardian's consent link went (juniors only). */
  guardianConsentSentTo: string | null
}

export interface MessageDto {
  ok: true
  message: string
}

export interface EmailVerifiedDto {
  verified: true
  email: string
}

export interface GuardianConsentDto {
  memberName: string
  clubName: string
  guardianName: string | null
  /** When the guardian consented (ISO instant), or null while consent is still awaited. */
  consentedAt: string | null
  /** The club's time zone (IANA), in which the page shows the date: the guardian is not signed in. */
  timeZone: string
}

/** One of my sessions that has not ended, for the profile's list (newest use first). */
export interface SessionDto {
  id: string
  /** The browser and system in words, from the user agent ("Firefox on Windows"). */
  device: string
  /** The address the session began from. */
  address: string
  createdAt: string
  lastSeenAt: string
  /** True for the session this request came with. */
  current: boolean
}

/** Answer to "sign out everywhere else". */
export interface SessionsEndedDto {
  ended: number
}
