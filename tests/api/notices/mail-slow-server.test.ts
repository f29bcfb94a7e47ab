// A mail server slower than the notice lease: against an app server and database of this file's own
// and a small SMTP server written here, which holds its reply to each message for longer than the
// (shortened) lease. Two queue runs at once must still deliver every notice exactly once.
import { randomUUID } from 'node:crypto'
import { createServer, type Server, type Socket } from 'node:net'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startAppServer } from '../../../scripts/lib/processes.mjs'
import { prepareDatabase } from '../../../scripts/lib/database.mjs'
import { ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { ago, makeMember, makeNotice, setMembership, setNotice, type NoticeStatus } from '../../support/factories'
import { testEnv, serverEnv, DEMO } from '../../support/test-env'
import { signIn } from '../../support/global-setup'

const APP_PORT = TEST.spareBase + 10
const SMTP_PORT = TEST.spareBase + 11
const baseUrl = `http://127.0.0.1:${APP_PORT}`
const DATABASE = 'hoopwise_test_mail_slow'
const serverDbUrl = testEnv.databaseUrl.replace(/\/[^/]+$/, '/postgres')
const databaseUrl = testEnv.databaseUrl.replace(/\/[^/]+$/, `/${DATABASE}`)
const LEASE_SECONDS = 1
const REPLY_DELAY_MS = 3_500

interface Delivery { to: string[], subject: string }

/**
 * A minimal SMTP server (RFC 5321 commands nodemailer uses, no TLS: it listens on loopback). It
 * counts a message as delivered as soon as the closing dot arrives — as a real server that has
 * queued it would — and only then waits `REPLY_DELAY_MS` before answering 250.
 */
function slowSmtpServer(deliveries: Delivery[]): Server {
  return createServer((socket: Socket) => {
    let buffer = ''
    let inData = false
    let to: string[] = []
    const reply = (line: string) => socket.writable && socket.write(`${line}\r\n`)
    reply('220 slow.test ESMTP')
    socket.on('error', () => {})
    socket.on('data', (chunk) => {
      buffer += chunk.toString('latin1')
      for (;;) {
        if (inData) {
          const end = buffer.indexOf('\r\n.\r\n')
          if (end < 0) return
          const message = buffer.slice(0, end)
          buffer = buffer.slice(end + 5)
          inData = false
          deliveries.push({ to, subject: message.match(/^Subject: (.*)$/m)?.[1] ?? '' })
          to = []
          setTimeout(() => reply('250 2.0.0 queued'), REPLY_DELAY_MS)
          continue
        }
        const at = buffer.indexOf('\r\n')
        if (at < 0) return
        const line = buffer.slice(0, at)
        buffer = buffer.slice(at + 2)
        const verb = line.slice(0, 4).toUpperCase()
        if (verb === 'EHLO') reply('250-slow.test\r\n250 8BITMIME')
        else if (verb === 'HELO' || verb === 'MAIL' || verb === 'RSET' || verb === 'NOOP') reply('250 OK')
        else if (verb === 'RCPT') {
          to.push(line.match(/<([^>]*)>/)?.[1]?.toLowerCase() ?? '')
          reply('250 OK')
        }
        else if (verb === 'DATA') {
          inData = true
          reply('354 go ahead')
        }
        else if (verb === 'QUIT') {
          reply('221 bye')
          socket.end()
        }
        else reply('502 not implemented')
      }
    })
  })
}

const deliveries: Delivery[] = []
let smtp: Server | undefined
let server: Awaited<ReturnType<typeof startAppServer>> | undefined
let cookie = ''
let clubId = ''

beforeAll(async () => {
  await sql(`DROP DATABASE IF EXISTS ${DATABASE} WITH (FORCE)`, [], serverDbUrl)
  await sql(`CREATE DATABASE ${DATABASE}`, [], serverDbUrl)
  await prepareDatabase({ databaseUrl, publicUrl: baseUrl, log: () => {} })
  smtp = slowSmtpServer(deliveries)
  await new Promise<void>(resolve => smtp!.listen(SMTP_PORT, '127.0.0.1', resolve))
  server = await startAppServer({
    root: ROOT,
    port: APP_PORT,
    env: serverEnv({
      NUXT_DATABASE_URL: databaseUrl,
      NUXT_PUBLIC_URL: baseUrl,
      NUXT_SMTP_PORT: String(SMTP_PORT),
      // The lease is far shorter than the server's reply; the transport waits long enough for it.
      NUXT_NOTICE_LEASE_SECONDS: String(LEASE_SECONDS),
      NUXT_SMTP_SOCKET_TIMEOUT_MS: '20000',
    }),
  })
  cookie = await signIn(baseUrl, DEMO.admin, DEMO.password)
  const [club] = await sql<{ id: string }>(`SELECT id FROM clubs WHERE tag_prefix = 'SRG'`, [], databaseUrl)
  clubId = club!.id
  // Only this file's notices go to the slow server: the demo club's reminders are switched off.
  await setMembership('all', { noticeOptOuts: ['dues_reminder', 'dues_reminder_week', 'dues_grace', 'dues_lapsed'] }, databaseUrl)
  await setNotice({ status: 'queued' }, { status: 'skipped' }, databaseUrl)
  // Nor is any demo vessel's proof about to lapse (a safety notice nobody can opt out of).
  await sql(`UPDATE vessels SET state = 'retired' WHERE state = 'in_service'`, [], databaseUrl)
  // Nor is any demo training record about to expire (a safety notice too).
  await sql(`UPDATE training_records SET expires_on = (expires_on + interval '5 years')::date`, [], databaseUrl)
  // Nor any demo pressure tier (its expiry warnings are a safety notice too).
  await sql(`UPDATE member_tiers SET expires_on = (expires_on + interval '5 years')::date`, [], databaseUrl)
}, 180_000)

afterAll(async () => {
  await server?.stop()
  await new Promise(resolve => smtp ? smtp.close(resolve) : resolve(undefined))
  await sql(`DROP DATABASE IF EXISTS ${DATABASE} WITH (FORCE)`, [], serverDbUrl)
})

/** A member of this file's demo club with one queued notice; returns the notice id and address. */
async function memberWithNotice(tag: string, status: NoticeStatus = 'queued'): Promise<{ id: string, email: string }> {
  const m = await makeMember({
    clubId, email: `slow-${tag}-${Date.now()}@test.hoopwise.example`, name: 'Slow Mail Member', passwordHash: 'not-a-hash',
    paidDays: 200, birthDate: null, acceptWaiver: false, db: databaseUrl,
  })
  const { noticeId } = await makeNotice({
    memberId: m.memberId, kind: 'signup_approved', subject: `Welcome ${tag}`, textBody: 'Welcome', htmlBody: '<p>Welcome</p>',
    status, db: databaseUrl,
  })
  return { id: noticeId, email: m.email }
}

const deliveredTo = (email: string) => deliveries.filter(d => d.to.includes(email)).length
const run = () => api('/api/outbox/run', { method: 'POST', as: cookie, baseUrl })

describe('a mail server slower than the lease', () => {
  it('delivers each notice exactly once when two queue runs go at once', async () => {
    const notices = await Promise.all(['a', 'b', 'c'].map(tag => memberWithNotice(tag)))
    const ids = notices.map(n => n.id)
    const both = Promise.all([run(), run()])
    // The server has a message and holds its reply; wait past the claim's (shortened) lease.
    const deadline = Date.now() + 20_000
    while (!notices.some(n => deliveredTo(n.email)) && Date.now() < deadline) await new Promise(r => setTimeout(r, 50))
    await new Promise(r => setTimeout(r, (LEASE_SECONDS + 0.6) * 1000))
    // A claim older than its lease carries the 1 s lease of the setting, renewed while the reply is awaited.
    const inFlight = await sql<{ renewed: boolean, short: boolean }>(`SELECT locked_until >= updated_at + interval '1.25 seconds' AS renewed,
      locked_until <= now() + interval '5 seconds' AS short FROM notices
      WHERE id = ANY ($1::uuid[]) AND status = 'sending' AND updated_at < now() - interval '1 second'`, [ids], databaseUrl)
    expect(inFlight.length).toBeGreaterThan(0)
    for (const row of inFlight) expect(row).toEqual({ renewed: true, short: true })
    // A third run now finds no lease run out to take over.
    const third = await run()
    const [first, second] = await both
    for (const answer of [first, second, third]) expect(answer.status).toBe(200)
    expect(first.body.sent + second.body.sent + third.body.sent).toBe(notices.length)

    for (const n of notices) expect(deliveredTo(n.email), n.email).toBe(1)
    const rows = await sql<{ status: string, attempts: number }>(`SELECT status, attempts FROM notices WHERE id = ANY ($1::uuid[])`,
      [ids], databaseUrl)
    expect(rows).toEqual(notices.map(() => ({ status: 'sent', attempts: 1 })))
    // Another run later finds nothing more to send.
    expect((await run()).body.sent).toBe(0)
    for (const n of notices) expect(deliveredTo(n.email)).toBe(1)
  })

  it('never sends again a notice whose run stopped while sending it: it is marked failed for an admin to judge', async () => {
    // A run claimed this notice and stopped (or lost its database) before recording the outcome.
    const notice = await memberWithNotice('stopped', 'sending')
    await setNotice(notice.id, { lockedUntil: ago('1 minute'), claimId: randomUUID() }, databaseUrl)

    const answer = await run()
    expect(answer.status).toBe(200)
    expect(deliveredTo(notice.email)).toBe(0)
    const [row] = await sql<{ status: string, last_error: string }>(`SELECT status, last_error FROM notices WHERE id = $1`, [notice.id], databaseUrl)
    expect(row).toEqual({ status: 'failed', last_error: expect.stringMatching(/may have arrived/) })
  })
})
