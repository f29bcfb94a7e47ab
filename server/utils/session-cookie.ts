import type { H3Event } from 'h3'
import { openSession, type SessionStart } from '../services/accounts'

/**
 * Begins a session (sign-in, sign-up): a `sessions` row with the request's address and browser,
 * and a sealed cookie whose server-only part holds the row's id. The user in the cookie only shapes
 * the interface; every request reads the member again through the row.
 */
export async function startSession(event: H3Event, start: SessionStart): Promise<void> {
  const address = requestAddress(event).slice(0, 64)
  const sessionId = await openSession(start, address, getRequestHeader(event, 'user-agent') ?? null)
  await replaceUserSession(event, {
    user: start.user,
    secure: { sessionId },
    loggedInAt: new Date().toISOString(),
  })
  logAuthEvent({ account: start.user.email, address, outcome: 'signed_in' })
}

/**
 * Shows `name` as the signed-in member's name from now on, keeping everything else of the session
 * (its id above all). Replaces rather than merges: merging would concatenate the roles array.
 */
export async function renameInSession(event: H3Event, name: string): Promise<void> {
  const { id: _sessionId, ...session } = await getUserSession(event)
  if (session.user) await replaceUserSession(event, { ...session, user: { ...session.user, name } })
}
