import { signupSchemaFor } from '#shared/schemas/auth'
import type { SignupResultDto } from '#shared/types/accounts'
import { signUp, serverPasswordField } from '../../services/accounts'
import { clubToday, homeClub } from '../../services/clubs'

/**
 * Join the club: creates the account and a pending membership, e-mails a verification link (and a
 * junior's guardian a consent link), and signs the new member in. 201; 400 bad input (a junior
 * without guardian, a short or common password); 409 when the e-mail is taken; 429 (with Retry-After)
 * past the sign-ups an address may make in an hour, or past the e-mails the member's or the guardian's
 * address may receive in a day.
 */
export default defineEventHandler(async (event): Promise<SignupResultDto> => {
  const club = await homeClub()
  const input = await validBody(event, signupSchemaFor(clubToday(club), serverPasswordField))
  const outcome = await withRetryAfter(event, async () => {
    await countSignup(requestAddress(event))
    return signUp(input, club)
  })
  await startSession(event, outcome.session)
  setResponseStatus(event, 201)
  return {
    user: outcome.session.user,
    verificationSentTo: outcome.verificationSentTo,
    guardianConsentSentTo: outcome.guardianConsentSentTo,
  }
})
