import { LoginSchema } from '#shared/schemas/auth'
import { signIn } from '../../services/accounts'

/**
 * Sign in with e-mail and password. 401 for any mismatch (never says whether the e-mail exists); 429
 * with Retry-After past a limit. Marks the browser as known to the account (see rate-limit.ts).
 */
export default defineEventHandler(async (event) => {
  const { email, password } = await validBody(event, LoginSchema)
  const session = await withRetryAfter(event, () => signIn(email, password, requestAddress(event), isKnownDeviceFor(event, email)))
  rememberDevice(event, email)
  await startSession(event, session)
  return { user: session.user }
})
