// Nobody changes or removes an audit entry: not through any route of the API (called by a member who
// holds every officer role, each route with every parameter set to an audit entry's id and a body
// naming it), and not through SQL as the role the server connects as. Entries may only be added.
import pg from 'pg'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { makeClub, makeMember } from '../../support/factories'
import { sql } from '../../support/db'
import { testEnv } from '../../support/test-env'
import { concretePath, discoverRoutes, routeParams } from '../../support/routes'

/** Every audit entry's id and a digest of the whole row. */
async function snapshot(): Promise<Map<string, string>> {
  const rows = await sql<{ id: string, digest: string }>('SELECT id, md5(a::text) AS digest FROM audit_events a')
  return new Map(rows.map(r => [r.id, r.digest]))
}

/** What became of the entries of `before`: none may be missing or different (new ones may be there). */
function changes(before: Map<string, string>, after: Map<string, string>): string[] {
  return [...before].filter(([id, digest]) => after.get(id) !== digest).map(([id]) => id)
}

let cookie = ''
let entryId = ''
let clubId = ''

beforeAll(async () => {
  clubId = (await makeClub()).id
  const officer = await makeMember({ clubId, roles: ['instructor', 'safety_officer', 'admin'] })
  const res = await api('/api/auth/login', { body: { email: officer.email, password: officer.password } })
  expect(res.status).toBe(200)
  cookie = sessionCookieOf(res)
  // An entry of the club's own (the sign-in may add none): what the routes are pointed at.
  const [row] = await sql<{ id: string }>(`INSERT INTO audit_events (club_id, actor_membership_id, action, subject_type, subject_id, reason)
    VALUES ($1, $2, 'member.edit', 'membership', $2, 'Kept for the unchangeable-trail test') RETURNING id`, [clubId, officer.memberId])
  entryId = row!.id
})

describe('the audit trail cannot be changed', () => {
  it('through any route, whatever the parameters and body', async () => {
    const before = await snapshot()
    expect(before.has(entryId)).toBe(true)
    // Signing out last, so every other route is called signed in.
    const routes = discoverRoutes().sort((a, b) => Number(a === 'POST /api/auth/logout') - Number(b === 'POST /api/auth/logout'))
    const statuses: Record<string, number> = {}
    for (const route of routes) {
      const [method, pattern] = route.split(' ') as [string, string]
      const path = concretePath(pattern, Object.fromEntries(routeParams(pattern).map(name => [name, entryId])))
      const body = method === 'GET' ? undefined : { id: entryId, auditEventId: entryId, reason: 'rewritten', action: 'member.edit', confirm: true }
      const res = await api(path, { method, as: cookie, body, query: { id: entryId } })
      statuses[route] = res.status
    }
    expect(Object.values(statuses).filter(s => s >= 500)).toEqual([])
    expect(changes(before, await snapshot())).toEqual([])
  })

  it('through SQL as the application\'s role, even outside a transaction', async () => {
    const before = await snapshot()
    const client = new pg.Client({ connectionString: testEnv.appDatabaseUrl })
    await client.connect()
    const refused: string[] = []
    try {
      for (const statement of [
        `UPDATE audit_events SET reason = 'rewritten' WHERE id = '${entryId}'`,
        `UPDATE audit_events SET created_at = created_at - interval '1 day'`,
        `DELETE FROM audit_events WHERE id = '${entryId}'`,
        'DELETE FROM audit_events',
        'TRUNCATE audit_events',
        `INSERT INTO audit_events (id, club_id, actor_name, action, subject_type) VALUES ('${entryId}', '${clubId}', 'System', 'member.edit', 'membership')
           ON CONFLICT (id) DO UPDATE SET reason = 'rewritten'`,
        'ALTER TABLE audit_events DISABLE TRIGGER ALL',
      ]) {
        await client.query(statement).then(() => {}, (error: { code?: string }) => refused.push(error.code ?? '?'))
      }
    }
    finally {
      await client.end()
    }
    expect(refused).toHaveLength(7)
    expect(changes(before, await snapshot())).toEqual([])
  })
})
