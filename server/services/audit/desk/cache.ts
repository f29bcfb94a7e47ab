/**
 * A short-lived memo of desk answers, per server process. The desk reads the whole club (every vessel's
 * proof standing, every fill per event), so under load the same answer is reused for
 * `auditDeskCacheSeconds` (NUXT_AUDIT_DESK_CACHE_SECONDS; 0 turns it off): the desk may then be that
 * many seconds behind, which the page says. A pending answer is shared, so a burst of readers starts
 * one computation, and a failed one is forgotten at once.
 */
export function createMemo(maxEntries = 500) {
  const entries = new Map<string, { at: number, value: Promise<unknown> }>()
  return function memo<T>(key: string, ttlMs: number, work: () => Promise<T>, now = Date.now()): Promise<T> {
    if (ttlMs <= 0) return work()
    const hit = entries.get(key)
    if (hit && now - hit.at < ttlMs) return hit.value as Promise<T>
    const value = work()
    entries.delete(key)
    entries.set(key, { at: now, value })
    value.catch(() => entries.delete(key))
    // The oldest entry goes first (a Map keeps insertion order).
    if (entries.size > maxEntries) entries.delete(entries.keys().next().value!)
    return value
  }
}

const memo = createMemo()

/** `work`'s answer for `key`, reused for the configured number of seconds. */
export function deskCached<T>(key: string, work: () => Promise<T>): Promise<T> {
  return memo(key, Number(useRuntimeConfig().auditDeskCacheSeconds) * 1000, work)
}
