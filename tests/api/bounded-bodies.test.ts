import { readFileSync } from 'node:fs'
import { request } from 'node:http'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../scripts/lib/config.mjs'
import { serverEnv, testEnv } from '../support/test-env'
import { api } from '../support/http'

// A server of this file's own: its memory is measured, and its database connection looks in an empty
// schema (search_path=nowhere), so every table query fails the way a broken database would. Its public
// address is https, which turns HSTS on.
const PORT = TEST.spareBase + 8
const BASE = `http://127.0.0.1:${PORT}`
const brokenUrl = `${testEnv.databaseUrl}${testEnv.databaseUrl.includes('?') ? '&' : '?'}options=${encodeURIComponent('-c search_path=nowhere')}`
let server: Awaited<ReturnType<typeof startAppServer>> | undefined

beforeAll(async () => {
  server = await startAppServer({
    root: ROOT,
    port: PORT,
    env: serverEnv({ NUXT_DATABASE_URL: brokenUrl, NUXT_PUBLIC_URL: 'https://club.hoopwise.example' }),
  })
})

afterAll(async () => {
  await server?.stop()
})

/** The server process's resident memory in bytes (Linux: VmRSS in /proc/<pid>/status). */
function residentBytes(): number {
  const kb = readFileSync(`/proc/${server!.pid}/status`, 'utf8').match(/^VmRSS:\s+(\d+) kB/m)?.[1]
  return Number(kb) * 1024
}

interface Streamed { status: number, connection: string | undefined, sentBytes: number }

/** POSTs `totalBytes` of JSON-ish text in 64 KB chunks without a Content-Length (chunked), honouring back-pressure. */
function streamBody(path: string, totalBytes: number): Promise<Streamed> {
  return new Promise((resolve, reject) => {
    let sentBytes = 0
    let answer: Omit<Streamed, 'sentBytes'> | undefined
    const req = request(`${BASE}${path}`, { method: 'POST', headers: { 'content-type': 'application/json', 'transfer-encoding': 'chunked' } })
    const finish = () => answer ? resolve({ ...answer, sentBytes }) : reject(new Error(`no answer after ${sentBytes} bytes`))
    req.on('response', (res) => {
      answer = { status: res.statusCode ?? 0, connection: res.headers.connection }
      res.resume()
      res.on('end', finish)
    })
    // The server closes the connection after its 413: the rest of the body cannot be written.
    req.on('error', () => setTimeout(finish, 100))
    const chunk = Buffer.alloc(64 * 1024, 'a')
    const write = () => {
      while (sentBytes < totalBytes && !answer && !req.destroyed) {
        sentBytes += chunk.length
        if (!req.write(chunk)) return void req.once('drain', write)
      }
      if (!answer && !req.destroyed) req.end()
    }
    write()
  })
}

describe('bodies bounded while they stream', () => {
  it('refuses a 50 MB chunked body with 413 and closes the connection, growing the server by less than 20 MB', async () => {
    // Warm up: the first requests load the route's code.
    for (let i = 0; i < 3; i++) await streamBody('/api/auth/login', 200 * 1024)
    const before = residentBytes()
    const answer = await streamBody('/api/auth/login', 50 * 1024 * 1024)
    const grown = residentBytes() - before
    expect(answer.status).toBe(413)
    expect(answer.connection).toBe('close')
    expect(answer.sentBytes).toBeLessThan(50 * 1024 * 1024)
    expect(grown).toBeLessThan(20 * 1024 * 1024)
  })

  it('refuses a body whose Content-Length is over the limit before reading it', async () => {
    const res = await api('/api/auth/login', { baseUrl: BASE, body: { email: 'x'.repeat(70_000) } })
    expect(res.status).toBe(413)
    expect(res.headers.get('connection')).toBe('close')
  })

  it('refuses a large body on any route, also one that does not exist and one that takes no body', async () => {
    for (const path of ['/api/no-such-route', '/api/auth/logout']) {
      expect((await streamBody(path, 5 * 1024 * 1024)).status).toBe(413)
    }
  })
})

describe('errors from the database', () => {
  it('answer one plain message with a reference; the log holds the detail under that reference', async () => {
    const res = await api('/api/auth/login', { baseUrl: BASE, body: { email: 'someone@test.hoopwise.example', password: 'a-long-password-1' } })
    expect(res.status).toBe(500)
    expect(res.body.message).toMatch(/^Something went wrong on our side \(reference [0-9A-F]{8}\)$/)
    const reference = res.body.message.match(/reference ([0-9A-F]{8})/)[1]
    expect(res.body.data).toEqual({ reference })
    const text = JSON.stringify(res.body)
    for (const leak of ['relation', 'users', 'Sequelize', 'SELECT', 'does not exist', 'stack']) expect(text).not.toContain(leak)
    let line: string | undefined
    for (let i = 0; i < 20 && !line; i++) {
      line = server!.recentStderr().split('\n').find(l => l.includes(`"reference":"${reference}"`))
      if (!line) await new Promise(r => setTimeout(r, 100))
    }
    const logged = JSON.parse(line!)
    expect(logged).toMatchObject({ level: 'error', reference, status: 500, method: 'POST', path: '/api/auth/login' })
    // The first table the sign-in reads (its attempt counts, then the account) is out of reach.
    expect(logged.error.message).toMatch(/relation "(rate_limits|users)" does not exist/)
  })
})

describe('HSTS', () => {
  it('is sent when the public address is https', async () => {
    const res = await api('/api/health', { baseUrl: BASE })
    expect(res.headers.get('strict-transport-security')).toMatch(/^max-age=\d+; includeSubDomains$/)
  })
})
