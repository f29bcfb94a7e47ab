/**
 * The in-site path to go to after sign-in: `next` when it is a path on this site, '/' otherwise.
 * A path starts with one slash not followed by another slash or a backslash, so `//evil.example`
 * and `/\evil.example` (which browsers read as another host) are refused.
 */
export function safeNextPath(next: unknown): string {
  return typeof next === 'string' && /^\/(?![/\\])/.test(next) ? next : '/'
}
