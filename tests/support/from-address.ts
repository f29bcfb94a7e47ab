// Requests from a chosen loopback source address (127.0.0.0/8 is all local on Linux), so tests of
// per-address sign-in limits get an address of their own and never spend the shared 127.0.0.1's.
import { request, type IncomingHttpHeaders } from 'node:http'

export interface AddressedResponse {
  status: number
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  body: any
  headers: IncomingHttpHeaders
}

/**
 * POSTs `body` as JSON to `baseUrl + path` from `localAddress` (e.g. '127.0.0.23'), with any extra
 * `headers` (a cookie, X-Forwarded-For); never throws on 4xx/5xx.
 */
export function postFrom(localAddress: string, baseUrl: string, path: string, body: unknown, headers: Record<string, string> = {}): Promise<AddressedResponse> {
  const url = new URL(path, baseUrl)
  const payload = JSON.stringify(body)
  return new Promise((resolve, reject) => {
    const req = request({
      host: url.hostname,
      port: url.port,
      path: url.pathname,
      method: 'POST',
      localAddress,
      headers: { 'content-type': 'application/json', 'accept': 'application/json', 'content-length': Buffer.byteLength(payload), ...headers },
    }, (res) => {
      let text = ''
      res.setEncoding('utf8')
      res.on('data', (chunk: string) => {
        text += chunk
      })
      res.on('end', () => {
        let parsed: unknown = text
        try {
          parsed = text ? JSON.parse(text) : null
        }
        catch { /* not JSON */ }
        resolve({ status: res.statusCode ?? 0, body: parsed, headers: res.headers })
      })
    })
    req.on('error', reject)
    req.end(payload)
  })
}
