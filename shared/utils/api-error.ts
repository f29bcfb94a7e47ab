/**
 * The one reader of error answers from Hoopwise's routes, for every screen. It turns a failed
 * `$fetch` (or a `useFetch` error) into words a club secretary understands: the refusal reasons'
 * sentences (422), the field messages (400, also returned keyed by field for the form), the
 * server's own sentence otherwise. Codes never reach the screen: not a reason code, not a
 * capability name, not an HTTP reason phrase such as "Unprocessable Entity".
 */

/** What a screen shows of a failed request. */
export interface ApiErrorText {
  /** One or more sentences, never empty. */
  message: string
  /** Field messages keyed by field name (400), for the form to place beside its fields. */
  fields: Record<string, string>
  /** The refusal reasons' codes (422), for logic that branches on them; never to show. */
  codes: string[]
  /** The HTTP status, or null when the server was not reached. */
  status: number | null
}

// The phrases HTTP and our own error helpers put in `statusMessage`; a message equal to one says nothing.
const REASON_PHRASES = new Set([
  'bad request', 'unauthorized', 'forbidden', 'not found', 'method not allowed', 'conflict', 'gone',
  'payload too large', 'unsupported media type', 'unprocessable entity', 'too many requests', 'refused',
  'internal server error', 'server error', 'bad gateway', 'service unavailable', 'gateway timeout',
])

/** What to say when the answer carries no usable sentence, by HTTP status. */
const STATUS_WORDS: Record<number, string> = {
  400: 'Some of what was sent could not be read. Check the form and try again.',
  401: 'You are signed out. Sign in again to go on.',
  403: 'Your roles do not allow this.',
  404: 'That could not be found. It may have been removed.',
  409: 'Someone changed the same thing at the same moment. Load the page again and retry.',
  413: 'What was sent is too large.',
  415: 'What was sent could not be read. Load the page again and retry.',
  422: 'The club\'s rules do not allow this right now.',
  429: 'Too many tries in a short time. Wait a moment and try again.',
}
const SERVER_TROUBLE = 'Hoopwise could not do this just now. Try again in a moment.'
const NOT_REACHED = 'Hoopwise could not be reached. Check your connection and try again.'

// A capability or code in brackets at the end of a sentence: "(members.manage)", "(EMAIL_TAKEN)".
const BRACKETED_CODE = /\s*\((?:[a-z_]+(?:\.[a-z_]+)+|[A-Z][A-Z0-9]*(?:_[A-Z0-9]+)+)\)/g
const UPPER_SNAKE = /\b[A-Z][A-Z0-9]*(?:_[A-Z0-9]+)+\b/
// ofetch's own message: `[POST] "/api/x": 422 Unprocessable Entity`.
const FETCH_MESSAGE = /^\[[A-Z]+\] "/

/** A sentence fit for the screen, or null when `text` is a code, a reason phrase or nothing. */
export function wordsOnly(text: unknown): string | null {
  if (typeof text !== 'string') return null
  const cleaned = text.replace(BRACKETED_CODE, '').trim()
  if (!cleaned || FETCH_MESSAGE.test(cleaned) || UPPER_SNAKE.test(cleaned)) return null
  if (REASON_PHRASES.has(cleaned.toLowerCase().replace(/[.!]$/, ''))) return null
  return cleaned
}

/** Words for an HTTP status when the answer has none of its own (null: the server was not reached). */
export function statusWords(status: number | null): string {
  if (status === null) return NOT_REACHED
  return STATUS_WORDS[status] ?? (status >= 500 ? SERVER_TROUBLE : 'Something went wrong. Try again.')
}

interface ErrorLike {
  statusCode?: number
  status?: number
  message?: string
  data?: {
    statusCode?: number
    message?: string
    data?: { fields?: Record<string, string>, reasons?: { code?: string, message?: string }[] }
  }
}

/** Reads any error from `$fetch`/`useFetch` (or anything thrown) into what a screen shows. */
export function readApiError(error: unknown): ApiErrorText {
  const e = (error ?? {}) as ErrorLike
  const body = typeof e.data === 'object' && e.data ? e.data : undefined
  const status = e.statusCode ?? e.status ?? body?.statusCode ?? null
  const rawFields = body?.data?.fields
  const fields: Record<string, string> = {}
  for (const [key, value] of Object.entries(rawFields && typeof rawFields === 'object' ? rawFields : {})) {
    const words = wordsOnly(value)
    if (words) fields[key] = words
  }
  const reasons = Array.isArray(body?.data?.reasons) ? body.data.reasons : []
  const codes = reasons.map(r => r?.code).filter((c): c is string => typeof c === 'string')
  const sentences = [
    ...reasons.map(r => wordsOnly(r?.message)),
    ...(reasons.length ? [] : [...new Set(Object.values(fields))]),
  ].filter((s): s is string => !!s)
  const own = status === 400 && Object.keys(fields).length ? null : wordsOnly(body?.message)
  const message = sentences.length ? sentences.join(' ') : own ?? statusWords(status)
  return { message, fields, codes, status }
}
