import type { IncomingMessage } from 'node:http'
import { Transform, type Readable } from 'node:stream'

/** What one route accepts before its handler runs: body size, body media types, requests from other sites. */
export interface RequestRule {
  /** The largest body in bytes, counted while it streams in (413 beyond, and the connection closes). */
  maxBytes: number
  /** Media types (without parameters, lower case) a state-changing request's body may have; 415 otherwise. */
  mediaTypes: readonly string[]
  /** Whether a state-changing request from another site (Origin, Sec-Fetch-Site) is taken; 403 otherwise. */
  crossSite: boolean
  /**
   * The handler reads the request stream itself (an upload streamed to disk with busboy's limits, a
   * webhook that checks a signature over its raw body) through `boundedStream`, so the guard only
   * checks Content-Length and does not read ahead. Every other body is read by the guard, bounded, before any handler runs.
   */
  streamed: boolean
}

/** The largest JSON body a route takes unless its rule says otherwise (the longest field, a waiver, is 20 000 characters). */
export const DEFAULT_MAX_BODY_BYTES = 64 * 1024

export const DEFAULT_REQUEST_RULE: RequestRule = {
  maxBytes: DEFAULT_MAX_BODY_BYTES,
  mediaTypes: ['application/json'],
  crossSite: false,
  streamed: false,
}

/**
 * THE table of routes that differ from the default rule, keyed "METHOD /path" with `[param]` segments.
 * Every other route, including each route added later, gets DEFAULT_REQUEST_RULE without doing anything.
 * Upload routes go here as `{ maxBytes: …, mediaTypes: ['multipart/form-data'], streamed: true }`; the
 * payment webhook as `{ crossSite: true, streamed: true }` (it reads its raw body).
 */
export const REQUEST_RULES: Record<string, Partial<RequestRule>> = {
  // RFC 8058 one-click opt-out: a mail program POSTs "List-Unsubscribe=One-Click" form-encoded, from
  // its own site or none; the signed token in the query is the whole authority.
  'POST /api/notices/opt-out': { mediaTypes: ['application/json', 'application/x-www-form-urlencoded'], crossSite: true },
  // A photo (10 MB at most, checked again by busboy while it streams) with its few short fields.
  'POST /api/photos': { maxBytes: 10 * 1024 * 1024 + 64 * 1024, mediaTypes: ['multipart/form-data'], streamed: true },
  // A training record's evidence file (PDF, JPEG or PNG, 10 MB at most) with its few short fields.
  'POST /api/training/evidence': { maxBytes: 10 * 1024 * 1024 + 64 * 1024, mediaTypes: ['multipart/form-data'], streamed: true },
  // A roster file for the import (CSV, 20 MB at most).
  'POST /api/imports': { maxBytes: 20 * 1024 * 1024 + 64 * 1024, mediaTypes: ['multipart/form-data'], streamed: true },
  // A tier sign-off's evidence file (PDF, JPEG or PNG, 10 MB at most).
  'POST /api/tiers/signoffs/[id]/evidence': { maxBytes: 10 * 1024 * 1024 + 64 * 1024, mediaTypes: ['multipart/form-data'], streamed: true },
  // The payment service's signed events: from its own servers, JSON, read raw for the signature check.
  'POST /api/dues/webhook': { crossSite: true },
  // A device's queue of fills recorded offline: up to 200 items of under 1 KB each.
  'POST /api/events/[id]/fill-sync': { maxBytes: 200 * 1024 },
}

function matches(pattern: string, path: string): boolean {
  const want = pattern.split('/')
  const got = path.split('/')
  return want.length === got.length && want.every((part, i) => (/^\[[^\]]+\]$/.test(part) ? got[i] !== '' : part === got[i]))
}

/** The rule for `method` on `path` (no query string): the table's entry over the default. */
export function requestRuleFor(method: string, path: string, rules = REQUEST_RULES): RequestRule {
  const upper = method.toUpperCase()
  const key = Object.keys(rules).find((k) => {
    const [m, pattern] = k.split(' ') as [string, string]
    return m === upper && matches(pattern, path)
  })
  return { ...DEFAULT_REQUEST_RULE, ...(key ? rules[key] : {}) }
}

/** The methods that change something; only these are held to the media-type and same-site rules. */
export const STATE_CHANGING_METHODS = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

/** A Content-Type header's media type without parameters, lower case ('' when absent): "Application/JSON; charset=utf-8" → "application/json". */
export function mediaTypeOf(contentType: string | undefined): string {
  return (contentType ?? '').split(';')[0]!.trim().toLowerCase()
}

/** Whether the request announces a body: a non-zero Content-Length or any Transfer-Encoding (chunked). */
export function announcesBody(headers: IncomingMessage['headers']): boolean {
  return Number(headers['content-length'] ?? 0) > 0 || headers['transfer-encoding'] !== undefined
}

/**
 * Whether the browser says the request comes from another site: `Sec-Fetch-Site` other than
 * same-origin or none (a typed address), or an `Origin` that is neither the public address's origin nor
 * the host the request was sent to ("null", from sandboxed frames, counts as foreign). A request with
 * neither header (a non-browser client) is not foreign here; the other rules judge it.
 */
export function comesFromAnotherSite(headers: IncomingMessage['headers'], publicOrigin: string | null): boolean {
  const site = headers['sec-fetch-site']
  if (typeof site === 'string' && site !== 'same-origin' && site !== 'none') return true
  const origin = headers.origin
  if (origin === undefined) return false
  if (publicOrigin && origin === publicOrigin) return false
  try {
    return new URL(origin).host !== headers.host
  }
  catch {
    return true
  }
}

/** The origin ("https://club.example") of an address, or null when it is empty or malformed. */
export function originOf(url: string | undefined): string | null {
  try {
    return url ? new URL(url).origin : null
  }
  catch {
    return null
  }
}

/**
 * Reads a request body, counting bytes as they arrive, and stops at `maxBytes`: the promise rejects with
 * `TooLargeError` and the stream is left paused, so a huge or endless chunked body never fills memory.
 */
export function readBoundedBody(req: IncomingMessage, maxBytes: number): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    const done = () => {
      req.off('data', onData)
      req.off('end', onEnd)
      req.off('error', onError)
    }
    const onData = (chunk: Buffer) => {
      size += chunk.length
      if (size > maxBytes) {
        done()
        req.pause()
        reject(new TooLargeError(maxBytes))
        return
      }
      chunks.push(chunk)
    }
    const onEnd = () => {
      done()
      resolve(Buffer.concat(chunks))
    }
    const onError = (error: Error) => {
      done()
      reject(error)
    }
    req.on('data', onData).on('end', onEnd).on('error', onError)
  })
}

/**
 * For a `streamed` route (an upload to disk): the request body as a stream that counts bytes and fails
 * with `TooLargeError` past `maxBytes`, leaving the rest of the request unread. Pipe it to busboy or a file.
 */
export function boundedStream(req: IncomingMessage, maxBytes: number): Readable {
  let size = 0
  const counter = new Transform({
    transform(chunk: Buffer, _encoding, callback) {
      size += chunk.length
      if (size <= maxBytes) return callback(null, chunk)
      req.unpipe(counter)
      req.pause()
      callback(new TooLargeError(maxBytes))
    },
  })
  return req.pipe(counter)
}

/** A body over its route's limit. */
export class TooLargeError extends Error {
  constructor(readonly maxBytes: number) {
    super(`The body is larger than ${Math.round(maxBytes / 1024)} KB`)
  }
}
