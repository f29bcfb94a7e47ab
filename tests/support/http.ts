import { inject } from 'vitest'
import type { DemoRole } from './test-env'

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export interface ApiResponse<T = any> {
  status: number
  body: T
  headers: Headers
}

export interface ApiOptions {
  method?: string
  /** A JS value sent as JSON, a string sent as it is (for malformed-JSON tests), or a FormData sent as multipart. */
  body?: unknown
  /** A demo role (its shared cookie), a raw cookie string, or nothing for an anonymous call. */
  as?: DemoRole | string
  query?: Record<string, string | number | undefined>
  baseUrl?: string
  headers?: Record<string, string>
}

/** Calls the test server and returns status, parsed body and headers, never throwing on 4xx/5xx. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function api<T = any>(path: string, opts: ApiOptions = {}): Promise<ApiResponse<T>> {
  const base = opts.baseUrl ?? inject('baseUrl')
  const url = new URL(path, base)
  for (const [k, v] of Object.entries(opts.query ?? {})) if (v !== undefined) url.searchParams.set(k, String(v))
  const headers: Record<string, string> = { accept: 'application/json', ...opts.headers }
  if (opts.as) {
    const cookies = inject('cookies') as Record<string, string>
    headers.cookie = cookies[opts.as] ?? opts.as
  }
  let body: string | FormData | undefined
  // A multipart form (an upload) goes as it is; fetch writes its Content-Type with the boundary.
  if (opts.body instanceof FormData) body = opts.body
  else if (opts.body !== undefined) {
    headers['content-type'] ??= 'application/json'
    body = typeof opts.body === 'string' ? opts.body : JSON.stringify(opts.body)
  }
  const res = await fetch(url, { method: opts.method ?? (body ? 'POST' : 'GET'), headers, body, redirect: 'manual' })
  const text = await res.text()
  let parsed: unknown = text
  try {
    parsed = text ? JSON.parse(text) : null
  }
  catch { /* not JSON */ }
  return { status: res.status, body: parsed as T, headers: res.headers }
}

/** The session cookie from a response that set one ("nuxt-session=…"). */
export function sessionCookieOf(res: ApiResponse): string {
  const cookie = res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c?.startsWith('nuxt-session='))
  if (!cookie) throw new Error(`no session cookie in a ${res.status} response`)
  return cookie
}
