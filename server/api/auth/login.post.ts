import { Op, where, fn, col } from 'sequelize'
import { LoginSchema } from '../../../shared/schemas/auth'
import { User } from '../../models'
import { sessionUserFor, startSession } from '../../services/sessions'

// Verified against when the e-mail is unknown, so a miss costs the same time as a wrong password.
let dummyHash: Promise<string> | undefined

/** Sign in with e-mail and password. 401 for any mismatch (never says whether the e-mail exists); 429 after a burst. */
export default defineEventHandler(async (event) => {
  const { email, password } = await validBody(event, LoginSchema)
  const address = getRequestIP(event, { xForwardedFor: false }) ?? 'unknown'
  await assertLoginAllowed(email, address)
  useDb()
  const user = await User.findOne({ where: { [Op.and]: [where(fn('lower', col('email')), email)] } })
  dummyHash ??= hashPassword('not-a-real-password-0000')
  const ok = user ? await verifyPassword(user.passwordHash, password) : (await verifyPassword(await dummyHash, password), false)
  const sessionUser = ok && user ? await sessionUserFor(user) : null
  if (!sessionUser) {
    await recordLoginFailure(email, address)
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'E-mail or password is wrong' })
  }
  await clearLoginFailures(email)
  await startSession(event, sessionUser)
  return { user: sessionUser }
})
