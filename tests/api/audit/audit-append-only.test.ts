// The application's database role: read and append only on the audit trail, owner of nothing. The
// triggers refuse changes to audit_events for everyone; these checks show that the role the server
// connects as cannot switch them off either.
import pg from 'pg'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { prepareDatabase } from '../../../scripts/lib/database.mjs'
import { sql } from '../../support/db'
import { testEnv } from '../../support/test-env'

/** Runs `statement` as `url`'s role inside a transaction that is always rolled back; returns its error, if any. */
async function attempt(url: string, statement: string, params: unknown[] = []): Promise<{ code?: string, message?: string } | null> {
  const client = new pg.Client({ connectionString: url })
  await client.connect()
  try {
    await client.query('BEGIN')
    await client.query(statement, params)
    return null
  }
  catch (error) {
    return { code: (error as { code?: string }).code, message: (error as Error).message }
  }
  finally {
    await client.query('ROLLBACK').catch(() => {})
    await client.end()
  }
}

/** PostgreSQL's refusal of an ALTER or DROP by anyone but the owner ("table" or "relation" by statement). */
const OWNER_ONLY = /must be owner of (table|relation) audit_events/

describe('the application role on audit_events', () => {
  const asApp = (statement: string, params?: unknown[]) => attempt(testEnv.appDatabaseUrl, statement, params)

  it('is the role the test server connects as, and owns no table and is no superuser', async () => {
    expect(testEnv.appDatabaseUrl).not.toBe(testEnv.databaseUrl)
    const client = new pg.Client({ connectionString: testEnv.appDatabaseUrl })
    await client.connect()
    try {
      const { rows: [me] } = await client.query(`SELECT current_user AS role, rolsuper AS super,
        (SELECT count(*)::int FROM pg_tables WHERE schemaname = 'public' AND tableowner = current_user) AS owned
        FROM pg_roles WHERE rolname = current_user`)
      expect(me).toEqual({ role: 'hoopwise_app', super: false, owned: 0 })
    }
    finally {
      await client.end()
    }
  })

  it('may read and append', async () => {
    const [club] = await sql<{ id: string }>('SELECT id FROM clubs LIMIT 1')
    expect(await asApp('SELECT count(*) FROM audit_events')).toBeNull()
    expect(await asApp(`INSERT INTO audit_events (club_id, actor_name, action, subject_type)
      VALUES ($1, 'System', 'test.append', 'test')`, [club!.id])).toBeNull()
  })

  it.each([
    ['UPDATE', `UPDATE audit_events SET reason = 'bent'`, /permission denied for table audit_events/],
    ['DELETE', 'DELETE FROM audit_events', /permission denied for table audit_events/],
    ['TRUNCATE', 'TRUNCATE audit_events', /permission denied for table audit_events/],
    ['ALTER TABLE … DISABLE TRIGGER', 'ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_update_delete', OWNER_ONLY],
    ['ALTER TABLE … DISABLE TRIGGER ALL', 'ALTER TABLE audit_events DISABLE TRIGGER ALL', OWNER_ONLY],
    ['DROP TRIGGER', 'DROP TRIGGER audit_events_no_update_delete ON audit_events', OWNER_ONLY],
    ['DROP TABLE', 'DROP TABLE audit_events', OWNER_ONLY],
  ])('%s is refused for lack of privilege (not only by the trigger)', async (_label, statement, message) => {
    const refused = await asApp(statement)
    expect(refused?.code).toBe('42501')
    expect(refused?.message).toMatch(message)
  })

  it('leaves both triggers in place and enabled', async () => {
    const triggers = await sql<{ name: string, enabled: string }>(`SELECT tgname AS name, tgenabled AS enabled FROM pg_trigger
      WHERE tgrelid = 'audit_events'::regclass AND NOT tgisinternal ORDER BY tgname`)
    expect(triggers).toEqual([
      { name: 'audit_events_no_truncate', enabled: 'O' },
      { name: 'audit_events_no_update_delete', enabled: 'O' },
    ])
  })

  it('may still change the other tables, and not the migrations\' bookkeeping', async () => {
    expect(await asApp(`UPDATE notices SET attempts = attempts WHERE false`)).toBeNull()
    expect(await asApp(`DELETE FROM action_tokens WHERE false`)).toBeNull()
    expect((await asApp('SELECT * FROM schema_migrations'))?.message).toMatch(/permission denied/)
  })
})

describe('grants for tables that later migrations add', () => {
  const DATABASE = 'hoopwise_test_grants'
  const serverDbUrl = testEnv.databaseUrl.replace(/\/[^/]+$/, '/postgres')
  const ownerUrl = testEnv.databaseUrl.replace(/\/[^/]+$/, `/${DATABASE}`)
  const appUrl = testEnv.appDatabaseUrl.replace(/\/[^/]+$/, `/${DATABASE}`)

  beforeAll(async () => {
    await sql(`DROP DATABASE IF EXISTS ${DATABASE} WITH (FORCE)`, [], serverDbUrl)
    await sql(`CREATE DATABASE ${DATABASE}`, [], serverDbUrl)
  })
  afterAll(async () => {
    await sql(`DROP DATABASE IF EXISTS ${DATABASE} WITH (FORCE)`, [], serverDbUrl)
  })

  it('reach a table the grant code never named, after the next migration run; audit_events stays append-only', async () => {
    await prepareDatabase({ databaseUrl: appUrl, ownerUrl, publicUrl: 'http://127.0.0.1', seed: false, log: () => {} })
    // As a migration of another change would: a new table with a sequence, made by the owner.
    await sql('CREATE TABLE later_counts (id bigserial PRIMARY KEY, n integer NOT NULL)', [], ownerUrl)
    expect((await attempt(appUrl, 'INSERT INTO later_counts (n) VALUES (1)'))?.message).toMatch(/permission denied/)
    await prepareDatabase({ databaseUrl: appUrl, ownerUrl, publicUrl: 'http://127.0.0.1', seed: false, log: () => {} })
    expect(await attempt(appUrl, 'INSERT INTO later_counts (n) VALUES (1)')).toBeNull()
    expect(await attempt(appUrl, 'UPDATE later_counts SET n = 2')).toBeNull()
    expect(await attempt(appUrl, 'DELETE FROM later_counts')).toBeNull()
    expect((await attempt(appUrl, 'DELETE FROM audit_events'))?.message).toMatch(/permission denied for table audit_events/)
    expect((await attempt(appUrl, 'ALTER TABLE later_counts ADD COLUMN x integer'))?.message).toMatch(/must be owner/)
  })
})
