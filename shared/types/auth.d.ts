import type { SessionUser } from './session'

// The session user nuxt-auth-utils carries: see shared/types/session.ts.
declare module '#auth-utils' {
  // eslint-disable-next-line @typescript-eslint/no-empty-object-type
  interface User extends SessionUser {}
  // Server-only part of the sealed cookie: the id of the session's row in `sessions`.
  interface SecureSessionData {
    sessionId?: string
  }
}

export {}
