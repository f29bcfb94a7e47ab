/** Sign out: clears the session cookie. Safe to call when not signed in. */
export default defineEventHandler(async (event) => {
  await clearUserSession(event)
  return { ok: true }
})
