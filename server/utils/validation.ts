import type { H3Event } from 'h3'
import type { ZodType, ZodTypeDef } from 'zod'
import { DEFAULT_MAX_BODY_BYTES, requestRuleFor } from './request-rules'

type Schema<T> = ZodType<T, ZodTypeDef, unknown>

// Control characters other than tab and line breaks: PostgreSQL refuses NUL in text and JSONB, and
// none of them belongs in a name, a reason or a waiver. Refused for every route in one place.
// eslint-disable-next-line no-control-regex
const CONTROL_CHARS = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/

/** The largest JSON body validBody takes: the request guard's default limit per route. */
export const MAX_BODY_BYTES = DEFAULT_MAX_BODY_BYTES
/** How deeply a body may nest; our schemas need three levels at most. */
export const MAX_BODY_DEPTH = 20

interface Node { value: unknown, key: string | null, parent: Node | null, depth: number }

function pathOf(node: Node): string {
  const parts: string[] = []
  for (let n: Node | null = node; n && n.key !== null; n = n.parent) parts.unshift(n.key)
  return parts.join('.') || '_'
}

/**
 * Walks a parsed body without recursion (a hostile body cannot exhaust the stack): whether it nests
 * deeper than `maxDepth`, and the path of the first string holding a control character.
 */
export function scanBody(value: unknown, maxDepth = MAX_BODY_DEPTH): { tooDeep: boolean, controlAt: string | null } {
  const stack: Node[] = [{ value, key: null, parent: null, depth: 0 }]
  while (stack.length) {
    const node = stack.pop()!
    if (typeof node.value === 'string') {
      if (CONTROL_CHARS.test(node.value)) return { tooDeep: false, controlAt: pathOf(node) }
    }
    else if (node.value && typeof node.value === 'object') {
      if (node.depth >= maxDepth) return { tooDeep: true, controlAt: null }
      const entries = Object.entries(node.value)
      for (let i = entries.length - 1; i >= 0; i--) stack.push({ value: entries[i]![1], key: entries[i]![0], parent: node, depth: node.depth + 1 })
    }
  }
  return { tooDeep: false, controlAt: null }
}

/** The path of the first string inside `value` that holds a control character, or null. */
export function findControlChars(value: unknown): string | null {
  return scanBody(value, Number.POSITIVE_INFINITY).controlAt
}

function badRequest(message: string, field?: string): never {
  throw createError({
    statusCode: 400,
    statusMessage: 'Bad Request',
    message: field && field !== '_' ? `${field}: ${message}` : message,
    data: field ? { fields: { [field]: message } } : undefined,
  })
}

function refuseBadShape(value: unknown): void {
  const { tooDeep, controlAt } = scanBody(value)
  if (tooDeep) badRequest('The body is nested too deeply')
  if (controlAt) badRequest('Text may not contain control characters', controlAt)
}

function tooLarge(maxBytes: number): never {
  throw createError({ statusCode: 413, statusMessage: 'Payload Too Large', message: `The body is larger than ${maxBytes / 1024} KB` })
}

/**
 * Reads the JSON body (at most the route's limit in request-rules.ts, MAX_BODY_BYTES unless it names
 * another; 413 beyond) and parses it with `schema`; 400 with field messages when it does not fit, when
 * it is not a JSON object, or when it holds control characters.
 */
export async function validBody<T>(event: H3Event, schema: Schema<T>): Promise<T> {
  const maxBytes = requestRuleFor(event.method, event.path.split('?')[0]!).maxBytes
  if (Number(getRequestHeader(event, 'content-length') ?? 0) > maxBytes) tooLarge(maxBytes)
  // The request guard (server/middleware) has already read the body, bounded while it streamed.
  const text = await readRawBody(event, 'utf8')
  if (text && Buffer.byteLength(text) > maxBytes) tooLarge(maxBytes)
  let raw: unknown = {}
  if (text?.trim()) {
    try {
      raw = JSON.parse(text)
    }
    catch {
      badRequest('The body is not valid JSON')
    }
  }
  if (typeof raw !== 'object') badRequest('The body is not valid JSON')
  refuseBadShape(raw)
  const result = schema.safeParse(raw ?? {})
  if (!result.success) badInput(result.error)
  return result.data
}

/** Parses the query string with `schema`; 400 when it does not fit. */
export function validQuery<T>(event: H3Event, schema: Schema<T>): T {
  const query = getQuery(event)
  refuseBadShape(query)
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
