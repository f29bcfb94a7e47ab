// `npm start` against a database of your own, and `npm run admin:create`: on databases of this file's
// own (in the test cluster), so nothing here meets the demo club of the shared test database.
import { spawn } from 'node:child_process'
import { join } from 'node:path'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startAppServer } from '../../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { setUpDatabase, ADMIN_CREATE_HINT } from '../../../scripts/lib/setup.mjs'
import { api, sessionCookieOf } from '../../support/http'
import { sql } from '../../support/db'
import { testEnv, serverEnv } from '../../support/test-env'
import { createPasswordHash } from '../../../server/services/accounts/password-hashing'

const OWN = 'hoopwise_test_own_db'
const PRODUCTION = 'hoopwise_test_production'
const APP_PORT = TEST.spareBase + 1
const baseUrl = `http://127.0.0.1:${APP_PORT}`
const onDb = (url: string, database: string) => url.replace(/\/[^/]+$/, `/${database}`)
const serverDbUrl = onDb(testEnv.databaseUrl, 'postgres')
const own = { ownerUrl: onDb(testEnv.databaseUrl, OWN), appUrl: onDb(testEnv.appDatabaseUrl, OWN) }
const production = { ownerUrl: onDb(testEnv.databaseUrl, PRODUCTION), appUrl: onDb(testEnv.appDatabaseUrl, PRODUCTION) }
const PASSWORD = 'first-admin-password-42'

let server: Awaited<ReturnType<typeof startAppServer>> | undefined

async function freshDatabase(name: string) {
  await sql(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`, [], serverDbUrl)
  await sql(`CREATE DATABASE ${name}`, [], serverDbUrl)
}

/** Runs `npm run admin:create -- …args` against this file's own database, with `stdin` piped in. */
function adminCreate(args: string[], stdin = ''): Promise<{ code: number | null, out: string }> {
  const child = spawn(process.execPath, [join(ROOT, 'scripts/admin-create.mjs'), ...args], {
    cwd: ROOT,
    env: { ...process.env, NUXT_DATABASE_URL: own.appUrl, NUXT_DATABASE_OWNER_URL: own.ownerUrl },
    stdio: ['pipe', 'pipe', 'pipe'],
  })
  let out = ''
  const collect = (d: Buffer) => {
    out += d
  }
  child.stdout.on('data', collect)
  child.stderr.on('data', collect)
  child.stdin.end(stdin)
  return new Promise(resolve => child.once('exit', code => resolve({ code, out })))
}

/** Demo accounts and clubs in `ownerUrl`'s database: the demo club's e-mails all end in hoopwise.example. */
async function demoTraces(ownerUrl: string) {
  const [row] = await sql<{ demo: number, clubs: number }>(`SELECT
    (SELECT count(*)::int FROM users WHERE lower(email) LIKE '%hoopwise.example') AS demo,
    (SELECT count(*)::int FROM clubs) AS clubs`, [], ownerUrl)
  return row
}

beforeAll(async () => {
  await freshDatabase(OWN)
  await freshDatabase(PRODUCTION)
})

afterAll(async () => {
  await server?.stop()
  for (const name of [OWN, PRODUCTION]) await sql(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`, [], serverDbUrl)
})

describe('npm start against a database of your own, then npm run admin:create', () => {
  it('the set-up step migrates the database named by URL, seeds nothing and says how to make the first admin', async () => {
    const said: string[] = []
    const outcome = await setUpDatabase({
      env: { NUXT_DATABASE_URL: own.appUrl, NUXT_DATABASE_OWNER_URL: own.ownerUrl },
      publicUrl: baseUrl,
      log: (line: string) => said.push(line),
    })
    expect(outcome).toMatchObject({ databaseUrl: own.appUrl, ownerUrl: own.ownerUrl, privateCluster: false, seeded: false })
    const migrated = await sql<{ name: string }>('SELECT name FROM schema_migrations', [], own.ownerUrl)
    expect(migrated.map(m => m.name)).toContain('0001-foundation')
    expect(await demoTraces(own.ownerUrl)).toEqual({ demo: 0, clubs: 0 })
    expect(said.join('\n')).toContain(ADMIN_CREATE_HINT)
    expect(ADMIN_CREATE_HINT).toBe('npm run admin:create -- --email you@club.example --club "Club name"')
  })

  it('admin:create refuses a password under 12 characters and creates nothing', async () => {
    const run = await adminCreate(['--email', 'short@club.example', '--club', 'Estuary Rocketry Club', '--password-stdin'], 'elevenchars\n')
    expect(run.code).toBe(1)
    expect(run.out).toContain('at least 12 characters')
    expect(await sql('SELECT id FROM users', [], own.ownerUrl)).toEqual([])
  })

  it('admin:create refuses a common password, as sign-up does, and creates nothing', async () => {
    const run = await adminCreate(['--email', 'common@club.example', '--club', 'Estuary Rocketry Club', '--password-stdin'], 'password1234\n')
    expect(run.code).toBe(1)
    expect(run.out).toContain('among the most common')
    expect(await sql('SELECT id FROM users', [], own.ownerUrl)).toEqual([])
  })

  it('admin:create makes the club, the account and an active admin who can sign in and act', async () => {
    const run = await adminCreate(['--email', 'Chair@Club.example', '--club', 'Estuary Rocketry Club', '--name', 'Rowan Chair',
      '--time-zone', 'Europe/Dublin', '--public-url', baseUrl, '--password-stdin'], `${PASSWORD}\n`)
    expect(run.out).toContain('is an admin of Estuary Rocketry Club (club created)')
    expect(run.code).toBe(0)

    const [row] = await sql<{ passwordHash: string, roles: string[], approved: boolean, paidThrough: string, tagPrefix: string, timeZone: string }>(`
      SELECT u.password_hash AS "passwordHash", m.roles, m.approved_at IS NOT NULL AS approved, m.paid_through::text AS "paidThrough",
        c.tag_prefix AS "tagPrefix", c.time_zone AS "timeZone"
      FROM users u JOIN memberships m ON m.user_id = u.id JOIN clubs c ON c.id = m.club_id WHERE u.email = 'chair@club.example'`, [], own.ownerUrl)
    expect(row).toMatchObject({ roles: ['member', 'admin'], approved: true, tagPrefix: 'ERC', timeZone: 'Europe/Dublin' })
    // The stored hash is one sign-in verifies (the server's own scrypt parameters).
    const hasher = createPasswordHash()
    expect(await hasher.verify(row!.passwordHash, PASSWORD)).toBe(true)
    expect(await hasher.verify(row!.passwordHash, `${PASSWORD}x`)).toBe(false)
    const audit = await sql<{ action: string }>('SELECT action FROM audit_events', [], own.ownerUrl)
    expect(audit).toEqual([{ action: 'member.admin_created' }])
    expect(await demoTraces(own.ownerUrl)).toEqual({ demo: 0, clubs: 1 })

    // And through the server, connected as the application role: sign in, an active admin's rights.
    server = await startAppServer({ root: ROOT, port: APP_PORT, env: serverEnv({ NUXT_DATABASE_URL: own.appUrl, NUXT_PUBLIC_URL: baseUrl }) })
    const login = await api('/api/auth/login', { baseUrl, body: { email: 'chair@club.example', password: PASSWORD } })
    expect(login.status).toBe(200)
    const cookie = sessionCookieOf(login)
    const me = await api('/api/me/standing', { baseUrl, as: cookie })
    expect(me.body.member).toMatchObject({ roles: ['member', 'admin'], status: 'active' })
    expect(me.body.club.name).toBe('Estuary Rocketry Club')
    expect((await api('/api/members', { baseUrl, as: cookie })).status).toBe(200)
  })

  it('admin:create refuses an e-mail that already has an account', async () => {
    const run = await adminCreate(['--email', 'chair@club.example', '--club', 'Estuary Rocketry Club', '--password-stdin'], `${PASSWORD}\n`)
    expect(run.code).toBe(1)
    expect(run.out).toContain('already exists')
    expect(await sql('SELECT id FROM users', [], own.ownerUrl)).toHaveLength(1)
  })

  it('admin:create --send-link queues a one-time link with which the new admin chooses the password', async () => {
    const run = await adminCreate(['--email', 'treasurer@club.example', '--club', 'estuary rocketry club', '--send-link'])
    expect(run.out).toContain('queued to treasurer@club.example')
    expect(run.code).toBe(0)
    const [notice] = await sql<{ kind: string, text: string }>(`SELECT n.kind, n.text_body AS text FROM notices n
      JOIN memberships m ON m.id = n.membership_id JOIN users u ON u.id = m.user_id WHERE u.email = 'treasurer@club.example'`, [], own.ownerUrl)
    expect(notice!.kind).toBe('set_password')
    const token = notice!.text.match(new RegExp(`${baseUrl}/reset-password\\?token=([A-Za-z0-9_-]+)`))?.[1]
    expect(token).toBeTruthy()
    // Nobody knows a password yet; the link sets one, once.
    const chosen = 'treasurer-chose-this-one'
    expect((await api('/api/auth/login', { baseUrl, body: { email: 'treasurer@club.example', password: chosen } })).status).toBe(401)
    expect((await api('/api/auth/password-reset', { baseUrl, body: { token, password: chosen } })).status).toBe(200)
    expect((await api('/api/auth/password-reset', { baseUrl, body: { token, password: chosen } })).status).toBe(422)
    const login = await api('/api/auth/login', { baseUrl, body: { email: 'treasurer@club.example', password: chosen } })
    expect(login.status).toBe(200)
    expect(login.body.user.roles).toEqual(['member', 'admin'])
    // The existing club was found by name, whatever its case: still one club.
    expect(await demoTraces(own.ownerUrl)).toEqual({ demo: 0, clubs: 1 })
  })

  it('once an admin exists the set-up step no longer asks for one', async () => {
    const said: string[] = []
    await setUpDatabase({ env: { NUXT_DATABASE_URL: own.appUrl, NUXT_DATABASE_OWNER_URL: own.ownerUrl }, publicUrl: baseUrl, log: (line: string) => said.push(line) })
    expect(said.join('\n')).not.toContain('admin:create')
  })
})

describe('the demo club goes in only where it belongs', () => {
  it('NODE_ENV=production wins over HOOPWISE_DEMO=1 and over the private cluster: nothing is seeded', async () => {
    const quiet = () => {}
    const external = await setUpDatabase({
      env: { NUXT_DATABASE_URL: production.appUrl, NUXT_DATABASE_OWNER_URL: production.ownerUrl, NODE_ENV: 'production', HOOPWISE_DEMO: '1' },
      publicUrl: baseUrl,
      log: quiet,
    })
    const privateCluster = await setUpDatabase({ env: { NODE_ENV: 'production', HOOPWISE_DEMO: '1' }, cluster: production, publicUrl: baseUrl, log: quiet })
    expect([external.seeded, privateCluster.seeded]).toEqual([false, false])
    expect(await demoTraces(production.ownerUrl)).toEqual({ demo: 0, clubs: 0 })
  })

  it('HOOPWISE_DEMO=1 outside production does seed the demo club on a database of your own', async () => {
    const outcome = await setUpDatabase({
      env: { NUXT_DATABASE_URL: production.appUrl, NUXT_DATABASE_OWNER_URL: production.ownerUrl, HOOPWISE_DEMO: '1' },
      publicUrl: baseUrl,
      log: () => {},
    })
    expect(outcome.seeded).toBe(true)
    expect(await sql(`SELECT 1 FROM users WHERE email = 'admin@hoopwise.example'`, [], production.ownerUrl)).toHaveLength(1)
  })
})
