import type { z } from 'zod'

/** A list screen's view as a zod object of query fields, each with its default (page, pageSize, filters …). */
type FilterSchema = z.ZodObject<z.ZodRawShape>

/**
 * Reads a list's filters from a route query key by key against `schema`: a missing, repeated or
 * bad value falls back to that key's default alone, so one broken parameter never empties the view.
 */
export function readQueryFilters<S extends FilterSchema>(schema: S, query: Record<string, unknown>): z.infer<S> {
  const out: Record<string, unknown> = schema.parse({})
  for (const [key, field] of Object.entries(schema.shape)) {
    const raw = query[key]
    if (typeof raw !== 'string' || raw === '') continue
    const parsed = (field as z.ZodTypeAny).safeParse(raw)
    if (parsed.success) out[key] = parsed.data
  }
  return out as z.infer<S>
}

/** The filters as a short query for the URL and the API: defaults and empty values are left out. */
export function writeQueryFilters<S extends FilterSchema>(schema: S, filters: Partial<z.infer<S>>): Record<string, string> {
  const defaults: Record<string, unknown> = schema.parse({})
  const query: Record<string, string> = {}
  for (const key of Object.keys(schema.shape)) {
    const value = (filters as Record<string, unknown>)[key]
    if (value === undefined || value === null || value === '' || value === defaults[key]) continue
    query[key] = String(value)
  }
  return query
}
