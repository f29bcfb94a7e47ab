// SMTP down, then up: against a server, mail catcher and database of this file's own, so stopping
// the catcher (and the failed sends it causes) cannot disturb the other files' mail.
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startAppServer, startMailCatcher } from '../../../scripts/lib/processes.mjs'
import { prepareDatabase } from '../../../scripts/lib/database.mjs'
import { ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeMember, NOW, setNotice } from '../../support/factories'
import { mailsTo } from '../../support/mail'
import { testEnv, serverEnv, DEMO } from '../../support/test-env'
import { signIn } from '../../support/global-setup'

const SMTP_PORT = TEST.spareBase + 5
const WEB_PORT = TEST.spareBase + 6
const APP_PORT = TEST.spareBase + 7
const baseUrl = `http://127.0.0.1:${APP_PORT}`
const mailUrl = `http://127.0.0.1:${WEB_PORT}`
const DATABASE = 'hoopwise_test_mail_outage'
const serverDbUrl = testEnv.databaseUrl.replace(/\/[^/]+$/, '/postgres')
const databaseUrl = testEnv.databaseUrl.replace(/\/[^/]+$/, `/${DATABASE}`)

type Child = Awaited<ReturnType<typeof startMailCatcher>>
let catcher: Child | undefined
let server: Child | undefined
let cookie = ''
let mailDir = ''

beforeAll(async () => {
  await sql(`DROP DATABASE IF EXISTS ${DATABASE} WITH (FORCE)`, [], serverDbUrl)
  await sql(`CREATE DATABASE ${DATABASE}`, [], serverDbUrl)
  await prepareDatabase({ databaseUrl, publicUrl: baseUrl, log: () => {} })
  mailDir = mkdtempSync(join(tmpdir(), 'hoopwise-outage-mail-'))
  catcher = await startMailCatcher({ smtpPort: SMTP_PORT, webPort: WEB_PORT, mailDir })
  server = await startAppServer({
    root: ROOT,
    port: APP_PORT,
    env: serverEnv({ NUXT_DATABASE_URL: databaseUrl, NUXT_PUBLIC_URL: baseUrl, NUXT_SMTP_PORT: String(SMTP_PORT) }),
  })
  cookie = await signIn(baseUrl, DEMO.admin, DEMO.password)
})

afterAll(async () => {
  await server?.stop()
  await catcher?.stop()
  await sql(`DROP DATABASE IF EXISTS ${DATABASE} WITH (FORCE)`, [], serverDbUrl)
  if (mailDir) rmSync(mailDir, { recursive: true, force: true })
})

/** A member of the demo club in this file's database whose dues run out in 10 days. */
async function memberDueSoon(): Promise<{ id: string, email: string }> {
  const m = await makeMember({
    email: `outage-${Date.now()}@test.hoopwise.example`, name: 'Outage Test Member', passwordHash: 'not-a-hash',
    paidDays: 10, birthDate: null, acceptWaiver: false, db: databaseUrl,
  })
  return { id: m.memberId, email: m.email }
}

interface Row { status: string, attempts: number, deferrals: number, last_error: string | null, later: boolean }
const reminderOf = async (memberId: string) => (await sql<Row>(`SELECT status, attempts, deferrals, last_error, next_attempt_at > now() AS later
  FROM notices WHERE membership_id = $1 AND kind = 'dues_reminder'`, [memberId], databaseUrl))
const run = () => api('/api/outbox/run', { method: 'POST', as: cookie, baseUrl })

describe('SMTP down, then up', () => {
  it('keeps the notice queued with a backoff while the mail server is down, then sends it exactly once', async () => {
    const member = await memberDueSoon()
    await catcher!.stop()

    const down = await run()
    expect(down.status).toBe(200)
    expect(down.body.retried).toBeGreaterThanOrEqual(1)
    expect(down.body.sent).toBe(0)
    expect(down.body.failed).toBe(0)
    const [queued] = await reminderOf(member.id)
    // An outage is a deferral with a backoff, not an attempt: it never uses up the notice's tries.
    expect(queued).toEqual(expect.objectContaining({ status: 'queued', later: true, attempts: 0 }))
    expect(queued!.deferrals).toBeGreaterThanOrEqual(1)
    expect(queued!.last_error).toMatch(/unreachable/i)

    // Before its backoff ends, another run leaves it alone.
    expect((await run()).status).toBe(200)
    expect((await reminderOf(member.id))[0]!.deferrals).toBe(queued!.deferrals)

    catcher = await startMailCatcher({ smtpPort: SMTP_PORT, webPort: WEB_PORT, mailDir })
    await setNotice({ membershipId: member.id }, { nextAttemptAt: NOW }, databaseUrl)
    const up = await run()
    expect(up.status).toBe(200)
    expect(up.body.sent).toBe(1)
    const [sent] = await reminderOf(member.id)
    expect(sent).toEqual(expect.objectContaining({ status: 'sent', attempts: 1, last_error: null }))
    expect(await mailsTo(member.email, mailUrl)).toHaveLength(1)

    const after = await run()
    expect(after.status).toBe(200)
    await new Promise(r => setTimeout(r, 500))
    expect(await mailsTo(member.email, mailUrl)).toHaveLength(1)
    expect((await reminderOf(member.id))).toHaveLength(1)
  })
})
