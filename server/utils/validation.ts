import type { H3Event } from 'h3'
import type { ZodType, ZodTypeDef } from 'zod'

type Schema<T> = ZodType<T, ZodTypeDef, unknown>

// Control characters other than tab and line breaks: PostgreSQL refuses NUL in text and JSONB, and
// none of them belongs in a name, a reason or a waiver. Refused for every route in one place.
// eslint-disable-next-line no-control-regex
const CONTROL_CHARS = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/

/** The path of the first string inside `value` that holds a control character, or null. */
export function findControlChars(value: unknown, path: string[] = []): string | null {
  if (typeof value === 'string') return CONTROL_CHARS.test(value) ? (path.join('.') || '_') : null
  if (value && typeof value === 'object') {
    for (const [key, inner] of Object.entries(value)) {
      const found = findControlChars(inner, [...path, key])
      if (found) return found
    }
  }
  return null
}

function refuseControlChars(value: unknown): void {
  const field = findControlChars(value)
  if (!field) return
  const message = 'Text may not contain control characters'
  throw createError({
    statusCode: 400,
    statusMessage: 'Bad Request',
    message: field === '_' ? message : `${field}: ${message}`,
    data: { fields: { [field]: message } },
  })
}

/** Reads the JSON body and parses it with `schema`; 400 with field messages when it does not fit. */
export async function validBody<T>(event: H3Event, schema: Schema<T>): Promise<T> {
  let raw: unknown
  try {
    raw = await readBody(event)
  }
  catch {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The body is not valid JSON' })
  }
  if (typeof raw === 'string') {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The body is not valid JSON' })
  }
  refuseControlChars(raw)
  const result = schema.safeParse(raw ?? {})
  if (!result.success) badInput(result.error)
  return result.data
}

/** Parses the query string with `schema`; 400 when it does not fit. */
export function validQuery<T>(event: H3Event, schema: Schema<T>): T {
  const query = getQuery(event)
  refuseControlChars(query)
  const result = schema.safeParse(query)
  if (!result.success) badInput(result.error)
  return result.data
}

/** Parses the route parameters with `schema`; a malformed id is "missing", so 404. */
export function validParams<T>(event: H3Event, schema: Schema<T>): T {
  const result = schema.safeParse(getRouterParams(event, { decode: true }))
  if (!result.success) notFound()
  return result.data
}
