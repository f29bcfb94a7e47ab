import { signupSchemaFor } from '../../../shared/schemas/auth'
import type { SignupResultDto } from '../../../shared/types/accounts'
import { clubToday, homeClub, signUp } from '../../services/accounts'
import { startSession } from '../../services/sessions'

/**
 * Join the club: creates the account and a pending membership, e-mails a verification link (and a
 * junior's guardian a consent link), and signs the new member in. 201; 400 bad input (a junior
 * without guardian); 409 when the e-mail is taken.
 */
export default defineEventHandler(async (event): Promise<SignupResultDto> => {
  const club = await homeClub()
  const input = await validBody(event, signupSchemaFor(clubToday(club)))
  const outcome = await signUp(input, club)
  await startSession(event, outcome.sessionUser)
  setResponseStatus(event, 201)
  return {
    user: outcome.sessionUser,
    verificationSentTo: outcome.verificationSentTo,
    guardianConsentSentTo: outcome.guardianConsentSentTo,
  }
})
