import { describe, it, expect, beforeAll } from 'vitest'
import { api } from '../support/http'
import { sql } from '../support/db'
import { makeMember, type MadeMember } from '../support/factories'
import { signIn } from '../support/global-setup'
import { discoverRoutes, concretePath } from '../support/routes'
import { testEnv } from '../support/test-env'

/**
 * Every write route × malformed JSON, wrong shapes and types, missing fields and oversize strings →
 * a 4xx with a message, never a 500, and nothing written. The caller holds every role, so what is
 * tested is the input check, not the right. Routes that take no body are listed with the reason.
 */
const NO_BODY: Record<string, string> = {
  'POST /api/auth/logout': 'signs out whatever the body',
  'POST /api/auth/resend-verification': 'acts on the signed-in account; takes no body',
  'POST /api/outbox/run': 'runs the notice job; takes no body',
  'DELETE /api/me/sessions/[id]': 'signs out the session in the path; takes no body',
}

const FIELDS = ['name', 'email', 'password', 'token', 'reason', 'version', 'typedName', 'title', 'body', 'birthDate',
  'phone', 'unitPreference', 'guardianName', 'guardianEmail', 'emergencyContactName', 'emergencyContactPhone']
const wrongTypes = { ...Object.fromEntries(FIELDS.map(f => [f, 12345])), roles: 'admin', optOuts: 'all' }
// Long enough to break every field's limit while the whole body stays under the 64 KB cap (then 413).
const huge = 'x'.repeat(3000)
const oversize = { ...Object.fromEntries(FIELDS.map(f => [f, huge])), roles: [huge], optOuts: [huge], version: 1 }

const PAYLOADS: [string, string | object][] = [
  ['malformed JSON', '{"name": '],
  ['a JSON array', '[1, 2, 3]'],
  ['a JSON string', '"hello"'],
  ['wrong types', wrongTypes],
  ['missing fields', {}],
  ['oversize strings', oversize],
  ['a body over 64 KB', { name: 'x'.repeat(70_000) }],
  ['JSON nested 5000 deep', `${'['.repeat(5000)}${']'.repeat(5000)}`],
  ['NUL and other control characters', { ...Object.fromEntries(FIELDS.map(f => [f, 'Ann\u0000\u001B'])), roles: ['member'], version: 1 }],
]

let actor: MadeMember
let subject: MadeMember
let cookie = ''

/** Everything the caller or the subject could have written, as one comparable JSON text. */
async function footprint(): Promise<string> {
  const ids = [actor.memberId, subject.memberId]
  const users = [actor.userId, subject.userId]
  const parts = await Promise.all([
    sql('SELECT * FROM users WHERE id = ANY($1) ORDER BY id', [users]),
    sql('SELECT * FROM memberships WHERE id = ANY($1) ORDER BY id', [ids]),
    sql('SELECT * FROM waiver_acceptances WHERE membership_id = ANY($1) ORDER BY id', [ids]),
    sql('SELECT * FROM notices WHERE membership_id = ANY($1) ORDER BY id', [ids]),
    sql('SELECT * FROM action_tokens WHERE user_id = ANY($1) ORDER BY id', [users]),
    sql('SELECT * FROM audit_events WHERE actor_membership_id = ANY($1) OR subject_id = ANY($1) ORDER BY id', [ids]),
    sql('SELECT * FROM waivers WHERE published_by = ANY($1) ORDER BY id', [ids]),
    sql(`SELECT count(*) FROM users WHERE length(email) > 200 OR email LIKE '12345%'`),
  ])
  return JSON.stringify(parts)
}

describe('bad input on every write route', () => {
  const writes = discoverRoutes().filter(r => !r.startsWith('GET ') && !NO_BODY[r])

  beforeAll(async () => {
    actor = await makeMember({ roles: ['instructor', 'safety_officer', 'admin'] })
    subject = await makeMember({ paidDays: null, approved: false })
    cookie = await signIn(testEnv.baseUrl, actor.email, actor.password)
  })

  it('lists only routes that exist among the body-less exceptions', () => {
    const all = discoverRoutes()
    expect(Object.keys(NO_BODY).filter(r => !all.includes(r))).toEqual([])
  })

  it.each(writes)('%s refuses bad input with a 4xx and writes nothing', async (route) => {
    const [method, pattern] = route.split(' ') as [string, string]
    const before = await footprint()
    for (const [label, body] of PAYLOADS) {
      const res = await api(concretePath(pattern, subject.memberId), { method, as: cookie, body })
      expect(res.status, `${route} with ${label}: ${JSON.stringify(res.body)?.slice(0, 160)}`).toBeGreaterThanOrEqual(400)
      expect(res.status, `${route} with ${label}`).toBeLessThan(500)
      expect(typeof res.body?.message, `${route} with ${label} has a message`).toBe('string')
      expect(res.body.message.length).toBeGreaterThan(0)
    }
    expect(await footprint()).toBe(before)
  })
})
