import { revokeSessions, loadLiveSession } from '../services/accounts'
import { normaliseRoles } from '#shared/utils/permissions'

/**
 * The session cookie's two hooks. `fetch` (`GET /api/_auth/session`, which the server-rendered page
 * uses too) applies the rule `requireMember` applies to every other route: a session that has ended
 * is cleared and answered 401; a live one shows the member's name, e-mail and roles as the database
 * holds them now. `clear` (sign-out, and `DELETE /api/_auth/session`) revokes the session's row, so
 * a copy of the cookie stops working too.
 */
export default defineNitroPlugin(() => {
  sessionHooks.hook('fetch', async (session, event) => {
    if (!session.user) return
    const live = await loadLiveSession(session.secure?.sessionId)
    if (!live) await endedSession(event)
    else Object.assign(session.user, { name: live.user.name, email: live.user.email, roles: normaliseRoles(live.membership.roles) })
  })
  sessionHooks.hook('clear', async (session, event) => {
    const sessionId = session.secure?.sessionId
    if (sessionId) await revokeSessions({ sessionId }, 'signed_out', requestAddress(event))
  })
})
