import { QueryTypes } from 'sequelize'

/**
 * Stops a revoked session from showing as signed in: when `GET /api/_auth/session` (which the
 * server-rendered page uses too) reads a session sealed at an older `users.session_version` than the
 * account's now (a password reset since), or whose account is gone, the session is cleared and the
 * answer is 401 — the same rule `requireMember` applies to every other route.
 */
export default defineNitroPlugin(() => {
  sessionHooks.hook('fetch', async (session, event) => {
    if (!session.user) return
    const [row] = await useDb().query<{ version: number }>('SELECT session_version AS version FROM users WHERE id = :id',
      { replacements: { id: session.user.id }, type: QueryTypes.SELECT })
    if (row && (session.secure?.sessionVersion ?? 0) >= row.version) return
    await clearUserSession(event)
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Please sign in again' })
  })
})
