// Signing in many made-up members in one file: each from an address of its own on the loopback
// network (127.x.y.z), so the sign-in limit per address, which the rate-limit tests check, is not
// spent by members who sign in once each.
import { request } from 'node:http'
import { randomInt } from 'node:crypto'
import { testEnv } from '../../support/test-env'

/** Signs in `email` from a random loopback address and returns the session cookie ("name=value"). */
export function signInFromOwnAddress(email: string, password: string, baseUrl = testEnv.baseUrl): Promise<string> {
  const url = new URL('/api/auth/login', baseUrl)
  const body = JSON.stringify({ email, password })
  const localAddress = `127.${randomInt(1, 255)}.${randomInt(1, 255)}.${randomInt(2, 255)}`
  return new Promise((resolve, reject) => {
    const req = request({
      host: url.hostname, port: url.port, path: url.pathname, method: 'POST', localAddress,
      headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) },
    }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => {
        const cookie = (res.headers['set-cookie'] ?? []).map(c => c.split(';')[0]!).find(c => c.startsWith('nuxt-session='))
        if (res.statusCode !== 200 || !cookie) reject(new Error(`sign-in as ${email} failed: ${res.statusCode} ${Buffer.concat(chunks).toString()}`))
        else resolve(cookie)
      })
    })
    req.on('error', reject)
    req.end(body)
  })
}
