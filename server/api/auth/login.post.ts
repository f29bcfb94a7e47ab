import { LoginSchema } from '../../../shared/schemas/auth'
import { signIn } from '../../services/accounts'
import { startSession } from '../../services/sessions'

/** Sign in with e-mail and password. 401 for any mismatch (never says whether the e-mail exists); 429 after a burst. */
export default defineEventHandler(async (event) => {
  const { email, password } = await validBody(event, LoginSchema)
  const session = await signIn(email, password, requestAddress(event))
  await startSession(event, session)
  return { user: session.user }
})
