// What a sign-up waits for before an admin may approve it, and before its member may accept the
// waiver. The server refuses with these reasons (422); the member page and the waiver page show the
// same sentences beforehand.

/** A reason code and the sentence shown with it (the shape of a 422's `reasons`). */
export interface Blocker { code: string, message: string }

/** Reason code: the account's e-mail address is not confirmed yet. */
export const EMAIL_NOT_CONFIRMED = 'EMAIL_NOT_CONFIRMED'
/** Reason code: a junior's guardian has not consented yet. */
export const GUARDIAN_CONSENT_MISSING = 'GUARDIAN_CONSENT_MISSING'

/** What the member page and the approval say about a sign-up not yet ready. */
export interface ApprovalFacts {
  name: string
  emailVerified: boolean
  junior: boolean
  guardianConsentAt: string | Date | null
}

/**
 * Why sign-up `m` cannot be approved yet: an unconfirmed e-mail (the club must be able to reach the
 * member, and the address is the member's identity for resets), and for a junior, the guardian's
 * missing consent. Empty when it may be approved.
 */
export function approvalBlockers(m: ApprovalFacts): Blocker[] {
  const blockers: Blocker[] = []
  if (!m.emailVerified) {
    blockers.push({ code: EMAIL_NOT_CONFIRMED, message: `${m.name} has not confirmed their e-mail address yet; approval waits until they open the link we sent.` })
  }
  if (m.junior && !m.guardianConsentAt) {
    blockers.push({ code: GUARDIAN_CONSENT_MISSING, message: `${m.name} is under 18: approval waits for their parent or guardian to consent from the e-mailed link.` })
  }
  return blockers
}

/** The refusal when a member with an unconfirmed e-mail tries to accept the waiver. */
export const WAIVER_NEEDS_EMAIL: Blocker = {
  code: EMAIL_NOT_CONFIRMED,
  message: 'Confirm your e-mail address first (open the link we e-mailed you, or ask for a new one), then accept the waiver.',
}
