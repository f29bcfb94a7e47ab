import { describe, it, expect, beforeAll } from 'vitest'
import type { ZodTypeAny } from 'zod'
import { api } from '../support/http'
import { sql } from '../support/db'
import { clubDay, makeMember, type MadeMember } from '../support/factories'
import { signIn } from '../support/global-setup'
import { discoverRoutes, concretePath, routeParams } from '../support/routes'
import { badValuesFor, bodySchemaRef, fieldsOf, kindOf, loadBodySchema, readsBody } from '../support/body-schemas'
import { testEnv } from '../support/test-env'
import { requestRuleFor } from '../../server/utils/request-rules'

/**
 * Every write route × whole-body faults (malformed JSON, not an object, over 64 KB, nested 5000 deep,
 * control characters) and, field by field, bad values derived from the route's own body schema (found
 * in the handler's `validBody(event, X)`) → a 4xx with a message, never a 500, and nothing written.
 * The caller holds every role, so what is tested is the input check, not the right. A write route
 * whose schema cannot be found fails; routes that take no body are listed with the reason.
 */
const NO_BODY: Record<string, string> = {
  'POST /api/auth/logout': 'signs out whatever the body',
  'POST /api/auth/resend-verification': 'acts on the signed-in account; takes no body',
  'POST /api/outbox/run': 'runs the notice job; takes no body',
  'POST /api/outbox/[id]/retry': 'queues the notice in the path again; takes no body',
  'DELETE /api/me/sessions/[id]': 'signs out the session in the path; takes no body',
  'DELETE /api/imports/[id]': 'drops the import in the path before it starts; takes no body',
  'POST /api/vessels/[id]/proof-requests': 'asks for a proof test of the vessel in the path; takes no body',
  'DELETE /api/photos/[id]': 'removes the photo in the path; takes no body',
  'POST /api/training/sessions/[id]/enrolment': 'enrols the caller in the session in the path; takes no body',
  'DELETE /api/training/sessions/[id]/enrolment': 'withdraws the caller from the session in the path; takes no body',
  'DELETE /api/me/calendar-feed': 'revokes the signed-in member\'s calendar link; takes no body',
  'POST /api/events/[id]/registration': 'registers the caller for the event in the path; takes no body',
  'DELETE /api/events/[id]/registration': 'withdraws the caller from the event in the path; takes no body',
  'DELETE /api/events/[id]/fill-snapshots/[deviceId]': 'releases the device in the path; takes no body',
  'POST /api/dues/webhook': 'the payment service\'s event: judged by its signature over the raw body, not a schema (tests/api/dues/payments.test.ts sends it bad bodies)',
}

const WHOLE_BODY: [string, string | object][] = [
  ['malformed JSON', '{"name": '],
  ['a JSON array', '[1, 2, 3]'],
  ['a JSON string', '"hello"'],
  ['a body over 64 KB', { name: 'x'.repeat(70_000) }],
  ['JSON nested 5000 deep', `${'['.repeat(5000)}${']'.repeat(5000)}`],
]

/** Route parameters: the subject's membership id, except those that are not ids (a tier's rank). */
const NON_ID_PARAMS: Record<string, string> = { rank: '2' }
const paramsFor = (pattern: string) => Object.fromEntries(routeParams(pattern).map(p => [p, NON_ID_PARAMS[p] ?? subject.memberId]))

interface RouteCase { route: string, schema: ZodTypeAny, fields: Record<string, ZodTypeAny> }

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
    sql('SELECT * FROM incidents WHERE reported_by_membership_id = ANY($1) ORDER BY id', [ids]),
    sql(`SELECT count(*) FROM users WHERE length(email) > 200 OR email LIKE '12345%'`),
  ])
  return JSON.stringify(parts)
}

/** Whether a route takes multipart forms (an upload; its request rule says so) rather than JSON. */
const takesMultipart = (route: string) => {
  const [method, pattern] = route.split(' ') as [string, string]
  return requestRuleFor(method, pattern).mediaTypes.includes('multipart/form-data')
}

// Upload routes read no JSON: the test below checks they refuse it, and their own tests (tests/api/photos/)
// check their fields and files.
const uploads = discoverRoutes().filter(takesMultipart)
const writes = discoverRoutes().filter(r => !r.startsWith('GET ') && !NO_BODY[r] && !takesMultipart(r))

/** Each write route with the schema its handler validates the body with (null when none is found). */
async function routeCases(): Promise<(RouteCase | { route: string, schema: null })[]> {
  return Promise.all(writes.map(async (route) => {
    const ref = bodySchemaRef(route)
    if (!ref) return { route, schema: null }
    const schema = await loadBodySchema(ref, clubDay())
    return { route, schema, fields: fieldsOf(schema) ?? {} }
  }))
}

/** Sends `body` to the route (any path parameter is the subject's membership id) and checks the refusal. */
async function expectRefused(route: string, label: string, body: unknown, field?: string) {
  const [method, pattern] = route.split(' ') as [string, string]
  const res = await api(concretePath(pattern, paramsFor(pattern)), { method, as: cookie, body })
  const what = `${route} with ${label}: ${res.status} ${JSON.stringify(res.body)?.slice(0, 200)}`
  expect(res.status, what).toBeGreaterThanOrEqual(400)
  expect(res.status, what).toBeLessThan(500)
  expect(typeof res.body?.message, what).toBe('string')
  expect(res.body.message.length, what).toBeGreaterThan(0)
  if (field) {
    // A bad value of one field is refused as that field's fault (400 naming it), not by accident.
    expect(res.status, what).toBe(400)
    expect(Object.keys(res.body.data?.fields ?? {}).some(k => k === field || k.startsWith(`${field}.`)), what).toBe(true)
  }
}

describe('bad input on every write route', () => {
  beforeAll(async () => {
    actor = await makeMember({ roles: ['instructor', 'safety_officer', 'admin'] })
    subject = await makeMember({ paidDays: null, approved: false })
    cookie = await signIn(testEnv.baseUrl, actor.email, actor.password)
  })

  it('lists only routes that exist and take no body among the body-less exceptions', () => {
    const all = discoverRoutes()
    expect(Object.keys(NO_BODY).filter(r => !all.includes(r))).toEqual([])
    expect(Object.keys(NO_BODY).filter(r => readsBody(r))).toEqual([])
  })

  it('finds a body schema with named fields in shared/schemas for every other write route', async () => {
    const cases = await routeCases()
    expect(cases.filter(c => !c.schema).map(c => c.route)).toEqual([])
    expect(cases.filter(c => c.schema && !Object.keys((c as RouteCase).fields).length).map(c => c.route)).toEqual([])
  })

  it('derives bad values the schemas refuse: wrong types, extra nesting, text and lists over their limits', async () => {
    for (const c of await routeCases()) {
      if (!c.schema) continue
      for (const [field, schema] of Object.entries((c as RouteCase).fields)) {
        for (const bad of badValuesFor(schema).filter(b => b.mustRefuse)) {
          expect(schema.safeParse(bad.value).success, `${c.route} ${field}: ${bad.label}`).toBe(false)
        }
      }
    }
  })

  it.each(uploads)('%s (an upload) refuses JSON bodies with 415 and writes nothing', async (route) => {
    const before = await footprint()
    for (const [label, body] of WHOLE_BODY) {
      const [method, pattern] = route.split(' ') as [string, string]
      const res = await api(concretePath(pattern, paramsFor(pattern)), { method, as: cookie, body })
      expect(res.status, `${route} with ${label}`).toBe(415)
    }
    expect(await footprint()).toBe(before)
  })

  it.each(writes)('%s refuses bad input with a 4xx and writes nothing', async (route) => {
    const c = (await routeCases()).find(x => x.route === route)!
    if (!c.schema) return expect.fail(`${route}: no body schema found in its handler`)
    const { schema, fields } = c as RouteCase
    const before = await footprint()
    for (const [label, body] of WHOLE_BODY) await expectRefused(route, label, body)
    const control = 'Ann\u0000\u001B'
    const texts = Object.keys(fields).filter(f => ['string', 'array'].includes(kindOf(fields[f]!)))
    await expectRefused(route, 'NUL and other control characters', texts.length
      ? Object.fromEntries(texts.map(f => [f, kindOf(fields[f]!) === 'array' ? [control] : control]))
      : { note: control })
    if (!schema.safeParse({}).success) await expectRefused(route, 'no fields', {})
    for (const [field, fieldSchema] of Object.entries(fields)) {
      for (const bad of badValuesFor(fieldSchema)) {
        // A value the field takes (an empty optional text, say) is not bad input.
        if (fieldSchema.safeParse(bad.value).success) continue
        await expectRefused(route, `${field}: ${bad.label}`, { [field]: bad.value }, field)
      }
    }
    expect(await footprint()).toBe(before)
  })
})
