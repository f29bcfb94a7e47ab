// `npm run tier:initial`: on a database of this file's own (in the test cluster), so the club's first
// T4 is really the first; the refusal is also checked in the demo club, whose safety officer holds one.
import { spawn } from 'node:child_process'
import { join } from 'node:path'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { ROOT } from '../../../scripts/lib/config.mjs'
import { setUpDatabase } from '../../../scripts/lib/setup.mjs'
import { sql } from '../../support/db'
import { makeMember } from '../../support/factories'
import { testEnv } from '../../support/test-env'

const OWN = 'hoopwise_test_tier_initial'
const onDb = (url: string, database: string) => url.replace(/\/[^/]+$/, `/${database}`)
const serverDbUrl = onDb(testEnv.databaseUrl, 'postgres')
const own = { ownerUrl: onDb(testEnv.databaseUrl, OWN), appUrl: onDb(testEnv.appDatabaseUrl, OWN) }

/** Runs `node scripts/<script> …args` against `db`. */
function run(script: string, args: string[], db: { ownerUrl: string, appUrl: string }, stdin = ''): Promise<{ code: number | null, out: string }> {
  const child = spawn(process.execPath, [join(ROOT, 'scripts', script), ...args], {
    cwd: ROOT,
    env: { ...process.env, NUXT_DATABASE_URL: db.appUrl, NUXT_DATABASE_OWNER_URL: db.ownerUrl },
    stdio: ['pipe', 'pipe', 'pipe'],
  })
  let out = ''
  child.stdout.on('data', (d: Buffer) => (out += d))
  child.stderr.on('data', (d: Buffer) => (out += d))
  child.stdin.end(stdin)
  return new Promise(resolve => child.once('exit', code => resolve({ code, out })))
}

beforeAll(async () => {
  await sql(`DROP DATABASE IF EXISTS ${OWN} WITH (FORCE)`, [], serverDbUrl)
  await sql(`CREATE DATABASE ${OWN}`, [], serverDbUrl)
  await setUpDatabase({ env: { NUXT_DATABASE_URL: own.appUrl, NUXT_DATABASE_OWNER_URL: own.ownerUrl }, publicUrl: 'http://127.0.0.1:1', log: () => {} })
}, 120_000)

afterAll(async () => {
  await sql(`DROP DATABASE IF EXISTS ${OWN} WITH (FORCE)`, [], serverDbUrl)
})

describe('npm run tier:initial', () => {
  it('grants a club\'s first T4 with prerequisites waived, marked initial and audited; then refuses', async () => {
    const made = await run('admin-create.mjs', ['--email', 'first@tiers.example', '--club', 'Estuary Launch Society', '--password-stdin'], own, 'estuary-password-long-42\n')
    expect(made.code, made.out).toBe(0)
    const granted = await run('tier-initial.mjs', ['--email', 'first@tiers.example'], own)
    expect(granted.code, granted.out).toBe(0)
    expect(granted.out).toContain('holds T4 in Estuary Launch Society (initial')
    const [member] = await sql<{ id: string }>(`SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = 'first@tiers.example'`, [], own.ownerUrl)
    const tiers = await sql<{ rank: number, initial: boolean, expires_on: string }>('SELECT rank, initial, expires_on::text FROM member_tiers WHERE membership_id = $1', [member!.id], own.ownerUrl)
    expect(tiers).toHaveLength(1)
    expect(tiers[0]).toMatchObject({ rank: 4, initial: true })
    const signoffs = await sql('SELECT kind, rank, assessor_membership_id FROM tier_signoffs WHERE membership_id = $1', [member!.id], own.ownerUrl)
    expect(signoffs).toEqual([{ kind: 'initial', rank: 4, assessor_membership_id: null }])
    const audit = await sql('SELECT action, actor_name FROM audit_events WHERE subject_id = $1 AND action = $2', [member!.id, 'tier.initial'], own.ownerUrl)
    expect(audit).toEqual([{ action: 'tier.initial', actor_name: 'System' }])
    // Once a T4 has existed the command refuses, even when that T4 is revoked.
    await sql(`UPDATE member_tiers SET revoked_at = now(), revocation_reason = 'test', revoked_by_membership_id = membership_id WHERE membership_id = $1`, [member!.id], own.ownerUrl)
    const again = await run('tier-initial.mjs', ['--email', 'first@tiers.example'], own)
    expect(again.code).toBe(1)
    expect(again.out).toContain('has had a T4 already')
    expect(await sql('SELECT count(*)::int AS n FROM tier_signoffs', [], own.ownerUrl)).toEqual([{ n: 1 }])
  }, 120_000)

  it('refuses in the demo club, which has had a T4, and for an unknown e-mail', async () => {
    const m = await makeMember()
    const shared = { ownerUrl: testEnv.databaseUrl, appUrl: testEnv.appDatabaseUrl }
    const refused = await run('tier-initial.mjs', ['--email', m.email], shared)
    expect(refused.code).toBe(1)
    expect(refused.out).toContain('has had a T4 already')
    expect(await sql('SELECT id FROM member_tiers WHERE membership_id = $1', [m.memberId])).toEqual([])
    const unknown = await run('tier-initial.mjs', ['--email', 'nobody@nowhere.example'], shared)
    expect(unknown.code).toBe(1)
    expect(unknown.out).toContain('No member with nobody@nowhere.example')
  }, 60_000)
})
