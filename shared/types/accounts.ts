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
}
