import type { H3Event } from 'h3'
import type { ZodType, ZodTypeDef } from 'zod'

type Schema<T> = ZodType<T, ZodTypeDef, unknown>

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
  const result = schema.safeParse(raw ?? {})
  if (!result.success) badInput(result.error)
  return result.data
}

/** Parses the query string with `schema`; 400 when it does not fit. */
export function validQuery<T>(event: H3Event, schema: Schema<T>): T {
  const result = schema.safeParse(getQuery(event))
  if (!result.success) badInput(result.error)
  return result.data
}

/** Parses the route parameters with `schema`; a malformed id is "missing", so 404. */
export function validParams<T>(event: H3Event, schema: Schema<T>): T {
  const result = schema.safeParse(getRouterParams(event, { decode: true }))
  if (!result.success) notFound()
  return result.data
}
