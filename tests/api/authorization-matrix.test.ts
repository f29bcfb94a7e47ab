import { describe, it, expect, beforeAll, inject } from 'vitest'
import { api } from '../support/http'
import { makeMember } from '../support/factories'
import { discoverRoutes, concretePath, routeParams } from '../support/routes'
import { signIn } from '../support/global-setup'
import { DEMO } from '../support/test-env'
import { requestRuleFor } from '../../server/utils/request-rules'

/**
 * Every route file under server/api × {anonymous, member, instructor, safety officer, admin} → the
 * expected status. Routes are discovered from the files, so a new route without a row fails here.
 *
 * Write routes are called with an empty body: a caller who may use the route gets 400 (the input is
 * checked only after the right), which proves the gate without changing anything. Reads answer 200.
 */
type Who = 'anon' | 'member' | 'instructor' | 'safety' | 'admin'
type Row = Record<Who, number>

const open = (s: number): Row => ({ anon: s, member: s, instructor: s, safety: s, admin: s })
const signedIn = (s: number): Row => ({ anon: 401, member: s, instructor: s, safety: s, admin: s })
/** Only the roles in `who` pass (with status `s`); the other signed-in roles get 403. */
const only = (s: number, ...who: Who[]): Row => ({
  anon: 401,
  member: who.includes('member') ? s : 403,
  instructor: who.includes('instructor') ? s : 403,
  safety: who.includes('safety') ? s : 403,
  admin: who.includes('admin') ? s : 403,
})

const MATRIX: Record<string, Row> = {
  'GET /api/health': open(200),
  'POST /api/auth/login': open(400),
  'POST /api/auth/logout': open(200),
  'POST /api/auth/signup': open(400),
  'POST /api/auth/verify-email': open(400),
  'POST /api/auth/resend-verification': signedIn(422), // the demo accounts are verified already
  'POST /api/auth/password-reset-request': open(400),
  'POST /api/auth/password-reset': open(400),
  'POST /api/guardian-consent': open(400),
  'POST /api/guardian-consent/preview': open(400),
  'GET /api/me/notice-settings': signedIn(200),
  'PUT /api/me/notice-settings': signedIn(400),
  'GET /api/outbox': only(200, 'admin'),
  'POST /api/outbox/run': only(200, 'admin'),
  'POST /api/outbox/[id]/retry': only(404, 'admin'), // [id] is a membership id here: no such notice
  'GET /api/notices/opt-out': open(400), // no token
  'POST /api/notices/opt-out': open(400),
  'GET /api/me/standing': signedIn(200),
  'PATCH /api/me/profile': signedIn(400),
  'GET /api/dashboard': signedIn(200),
  'GET /api/waivers/current': signedIn(200),
  'POST /api/waivers/accept': signedIn(400),
  'GET /api/waivers': only(200, 'safety'),
  'POST /api/waivers': only(400, 'safety'), // an empty body: nothing is published in the demo club
  'GET /api/members': only(200, 'instructor', 'safety', 'admin'),
  'GET /api/members/export': only(200, 'instructor', 'safety', 'admin'),
  'GET /api/members/[id]': only(200, 'instructor', 'safety', 'admin'), // another member's page
  'PATCH /api/members/[id]': only(400, 'admin'),
  'POST /api/members/[id]/approve': only(400, 'admin'),
  'POST /api/members/[id]/suspend': only(400, 'admin'),
  'POST /api/members/[id]/reinstate': only(400, 'admin'),
  'POST /api/members/[id]/resign': only(400, 'admin'),
  'POST /api/members/[id]/rejoin': only(400, 'admin'),
  'POST /api/members/[id]/erase': only(400, 'admin'), // an empty body: no one is erased
  'PUT /api/members/[id]/roles': only(400, 'admin'),
  'POST /api/members/[id]/guardian-consent': only(400, 'admin'),
  'GET /api/members/welcome': only(200, 'admin'), // members.manage: how many imported members wait for the welcome
  'POST /api/members/welcome': only(400, 'admin'), // not confirmed: nothing is sent
  'GET /api/audit': only(200, 'safety', 'admin'),
  'POST /api/imports': only(400, 'admin'), // no multipart form
  'GET /api/imports/[id]': only(404, 'admin'), // [id] is a membership id here: no such import
  'DELETE /api/imports/[id]': only(404, 'admin'),
  'POST /api/imports/[id]/dry-run': only(400, 'admin'),
  'POST /api/imports/[id]/run': only(400, 'admin'),
  'GET /api/imports/[id]/refused': only(404, 'admin'),
  'GET /api/audit/desk': only(200, 'safety', 'admin'),
  'GET /api/audit/desk/charts': only(200, 'safety', 'admin'),
  'GET /api/audit/desk/[table]': only(200, 'safety', 'admin'), // admins without injury details
  'GET /api/audit/desk/[table]/export': only(200, 'safety', 'admin'),
  'GET /api/audit/evidence-pack': only(200, 'safety', 'admin'), // a PDF of the last 12 months
  'GET /api/me/sessions': signedIn(200),
  'DELETE /api/me/sessions/[id]': signedIn(404), // [id] is a membership id here: no such session of mine
  'POST /api/me/sessions/sign-out-others': signedIn(400), // not confirmed: nothing is signed out
  'GET /api/calc/air-charge': open(400), // public; no pressure or volume given
  'POST /api/vessels': signedIn(400), // every member registers their own
  'GET /api/vessels': signedIn(200), // a member's own; the whole club's with vessels.read_all
  'GET /api/vessels/export': signedIn(200), // as the list: a member's own; the club's with vessels.read_all
  'GET /api/vessels/[id]': signedIn(404), // [id] is a membership id here: no such vessel
  'POST /api/vessels/[id]/proof-requests': signedIn(404), // the owner's own; no body, no such vessel
  'GET /api/proof-requests': only(200, 'instructor', 'safety'), // the demo safety officer is an instructor too
  'POST /api/vessels/[id]/proof-tests': only(400, 'instructor', 'safety'), // witnesses only; the demo safety officer is an instructor
  'GET /api/vessels/[id]/proof-tests': signedIn(404), // whoever may see the vessel; no such vessel
  'POST /api/vessels/[id]/events': signedIn(400), // the owner or an officer with vessels.read_all
  'POST /api/vessels/[id]/quarantine': only(400, 'safety'),
  'POST /api/vessels/[id]/release': only(400, 'safety'),
  'POST /api/vessels/[id]/retire': signedIn(400), // the owner or the safety officer
  'GET /api/vessel-policy': signedIn(200),
  'PUT /api/vessel-policy': only(400, 'safety'),
  'GET /api/vessels/[id]/photos': signedIn(404), // [id] is a membership id here: no such vessel
  'POST /api/photos': signedIn(400), // an empty multipart form: no purpose, no file
  'GET /api/photos/[id]': signedIn(404), // [id] is a membership id here: no such photo
  'GET /api/photos/[id]/thumbnail': signedIn(404),
  'DELETE /api/photos/[id]': signedIn(404),
  'POST /api/coupon-tests': signedIn(400), // any member records a coupon test they did or witnessed
  'GET /api/coupon-tests': signedIn(200), // coupons are club knowledge: every member
  'GET /api/layup-families': signedIn(200),
  'GET /api/vessels/[id]/burst-estimate': signedIn(404), // [id] is a membership id here: no such vessel
  'GET /api/vessels/by-tag/[tag]': signedIn(404), // a tag no club has given
  'GET /api/vessels/[id]/label': signedIn(404), // [id] is a membership id here: no such vessel
  'GET /api/training/courses': signedIn(200), // every member sees every course and where they stand
  'PUT /api/training/courses/[id]': only(400, 'safety'), // policy.edit: the safety officer sets validity and pass marks
  'GET /api/training/courses/[id]/roster': only(404, 'instructor', 'safety', 'admin'), // members.read; [id] is no course
  'GET /api/training/sessions': signedIn(200),
  'POST /api/training/sessions': only(400, 'instructor', 'safety'), // training.run; the demo safety officer is an instructor
  'GET /api/training/sessions/[id]': signedIn(404), // [id] is a membership id here: no such session
  'POST /api/training/sessions/[id]/enrolment': signedIn(404), // every member enrols themselves; no such session
  'DELETE /api/training/sessions/[id]/enrolment': signedIn(404),
  'PUT /api/training/sessions/[id]/attendance': only(400, 'instructor', 'safety'),
  'POST /api/training/sessions/[id]/issue': only(400, 'instructor', 'safety'),
  'GET /api/training/records': signedIn(200), // the caller's own
  'GET /api/training/records/export': signedIn(200), // the caller's own; an officer's: the club's
  'POST /api/training/records': only(400, 'instructor', 'safety'), // a course taken elsewhere
  'POST /api/training/records/[id]/retraining': only(400, 'instructor', 'safety'), // training.flag
  'POST /api/training/evidence': only(400, 'instructor', 'safety'), // an empty multipart form
  'GET /api/training/evidence/[id]': signedIn(404), // [id] is a membership id here: no such file
  'GET /api/training/imported': only(200, 'instructor', 'safety'), // training.run; the demo safety officer is an instructor
  'POST /api/training/imported/[id]/confirm': only(400, 'instructor', 'safety'), // not confirmed: nothing changes
  'POST /api/training/imported/[id]/reject': only(400, 'instructor', 'safety'), // no reason
  'GET /api/stations': signedIn(200),
  'POST /api/stations': only(400, 'safety', 'admin'), // stations.manage
  'PUT /api/stations/[id]': only(400, 'safety', 'admin'),
  'GET /api/bookings': signedIn(200), // the week view: every member
  'POST /api/bookings': signedIn(400), // every member books for themselves; the rules answer 422
  'GET /api/bookings/mine': signedIn(200),
  'POST /api/bookings/[id]/cancel': signedIn(404), // [id] is a membership id here: no such booking
  'GET /api/me/calendar-feed': signedIn(200),
  'POST /api/me/calendar-feed': signedIn(400), // not confirmed: the link is not renewed
  'DELETE /api/me/calendar-feed': signedIn(200),
  'GET /api/calendar/[token]': open(404), // no session, only the private link's token; an unknown one
  'GET /api/dues/renewal': signedIn(200),
  'GET /api/dues/plans': signedIn(200),
  'PUT /api/dues/plans/[id]': only(400, 'admin'),
  'POST /api/dues/checkout': signedIn(400), // every member renews their own
  'GET /api/dues/checkout/[id]': signedIn(404), // [id] is a membership id here: no such payment of mine
  'POST /api/dues/webhook': open(400), // the payment service's events: no signature
  'GET /api/dues/payments': only(200, 'admin'),
  'POST /api/dues/payments': only(400, 'admin'),
  'GET /api/dues/payments/export': only(200, 'admin'),
  'POST /api/dues/payments/[id]/refund': only(400, 'admin'),
  'GET /api/dues/totals': only(200, 'admin'),
  'GET /api/dues/overdue': only(200, 'admin'),
  'GET /api/dues/receipts': signedIn(200), // a member's own
  'GET /api/dues/receipts/[id]': signedIn(404), // [id] is a membership id here: no such receipt
  'GET /api/dues/receipts/[id]/pdf': signedIn(404),
  'PUT /api/dues/members/[id]/plan': only(400, 'admin'),
  'GET /api/me/fill-pass': signedIn(200), // every member's own pass (issued when none is live)
  'POST /api/me/fill-pass': signedIn(400), // not confirmed: the pass is not replaced
  'GET /api/verify/[token]': open(404), // no session, only the pass's signed token; an unknown one
  'GET /api/fill-passes/[token]/member': only(404, 'instructor', 'safety'), // fills.record_any; an unknown token
  'GET /api/events/[id]/fill-desk': signedIn(404), // [id] is a membership id here: no such event
  'POST /api/fills/check': signedIn(400), // a member for their own fills, staff for anyone: the body is checked first
  'POST /api/fills': signedIn(400),
  'GET /api/tiers': signedIn(200), // every member reads the club's tier table
  'GET /api/tiers/export': only(200, 'instructor', 'safety', 'admin'), // every member's tiers (members.read)
  'PUT /api/tiers': only(400, 'safety'), // policy.edit
  'GET /api/members/[id]/tiers': only(200, 'instructor', 'safety', 'admin'), // members.read, or the member's own
  'POST /api/members/[id]/tiers': only(400, 'instructor', 'safety'), // tiers.grant
  'POST /api/members/[id]/tiers/[rank]/renewal': only(404, 'instructor', 'safety'), // tiers.grant; the body is optional and no tier is held
  'POST /api/members/[id]/tiers/[rank]/suspend': only(400, 'safety'), // tiers.suspend
  'POST /api/members/[id]/tiers/[rank]/reinstate': only(400, 'safety'),
  'POST /api/members/[id]/tiers/[rank]/revoke': only(400, 'safety'),
  'POST /api/tiers/signoffs/[id]/evidence': only(400, 'instructor', 'safety'), // tiers.grant; an empty multipart form
  'GET /api/tiers/evidence/[id]': signedIn(404), // [id] is a membership id here: no such file
  'GET /api/tiers/imported': only(200, 'instructor', 'safety'), // tiers.grant
  'POST /api/tiers/imported/[id]/confirm': only(400, 'instructor', 'safety'), // not confirmed: nothing changes
  'POST /api/tiers/imported/[id]/reject': only(400, 'instructor', 'safety'), // no reason
  'GET /api/fill-stations': only(200, 'instructor', 'safety', 'admin'), // staff and officers (members.read)
  'POST /api/fill-stations': only(400, 'safety', 'admin'), // events.manage
  'PUT /api/fill-stations/[id]': only(400, 'safety', 'admin'),
  'POST /api/fill-stations/[id]/retire': only(400, 'safety', 'admin'),
  'GET /api/events': signedIn(200), // every member sees the club's events
  'POST /api/events': only(400, 'safety', 'admin'), // events.manage
  'GET /api/events/staff-choices': only(200, 'safety', 'admin'),
  'GET /api/events/[id]': signedIn(404), // [id] is a membership id here: no such event
  'PUT /api/events/[id]': only(400, 'safety', 'admin'),
  'POST /api/events/[id]/cancel': only(400, 'safety', 'admin'),
  'POST /api/events/[id]/registration': signedIn(404), // every member registers themselves; no such event
  'DELETE /api/events/[id]/registration': signedIn(404),
  'POST /api/events/[id]/walk-ins': only(400, 'instructor', 'safety'), // fills.record_any, and on the event's staff
  'GET /api/events/[id]/fills': only(404, 'instructor', 'safety', 'admin'), // members.read; no such event
  'GET /api/events/[id]/fills/export': only(404, 'instructor', 'safety', 'admin'),
  'GET /api/events/[id]/roster': only(404, 'instructor', 'safety', 'admin'),
  'GET /api/me/fills': signedIn(200), // the member's own
  'GET /api/fill-snapshots/key': signedIn(200), // the club's public key: any member
  'POST /api/events/[id]/fill-snapshots': only(400, 'instructor', 'safety'), // fills.record_any; the body is checked first
  'DELETE /api/events/[id]/fill-snapshots/[deviceId]': only(404, 'instructor', 'safety'), // fills.record_any; no such event
  'POST /api/events/[id]/fill-sync': signedIn(400), // staff or the device's issuer: the body is checked first
  'GET /api/me/data-export': signedIn(200), // the member's own data, a ZIP
  'GET /api/incidents': signedIn(200), // officers all, anyone else their own reports
  'POST /api/incidents': signedIn(400), // any signed-in member reports
  'GET /api/incidents/[id]': signedIn(404), // [id] is a membership id here: no such incident
  'PUT /api/incidents/[id]/review': only(400, 'safety'), // incidents.review
  'POST /api/incidents/[id]/close': only(400, 'safety'),
  'POST /api/incidents/[id]/suspensions': only(400, 'safety'), // incidents.review and tiers.suspend
  'GET /api/incidents/people': signedIn(400), // the report form's name search; no name part given
  'GET /api/incidents/vessels/[tag]': signedIn(404), // any vessel of the club for the report form; a tag no club has given
}

let subjectId = ''

/**
 * What each route parameter is filled with, by name, wherever it sits in the path. `[id]` is another
 * member's membership id (so a notice or session route answers 404: none of theirs has that id).
 * A route with a parameter not named here fails the matrix until a value is added.
 */
const PARAM_VALUES: Record<string, () => string> = {
  id: () => subjectId,
  tag: () => 'ZZZZZ-9999',
  token: () => 'A'.repeat(43),
  rank: () => '2',
  table: () => 'tiers-expiring',
  deviceId: () => subjectId,
}
const paramValues = (pattern: string) => Object.fromEntries(routeParams(pattern).map((name) => {
  const value = PARAM_VALUES[name]
  if (!value) throw new Error(`${pattern}: no value for [${name}] in PARAM_VALUES`)
  return [name, value()]
}))

describe('authorization matrix', () => {
  const routes = discoverRoutes()

  beforeAll(async () => {
    subjectId = (await makeMember()).memberId
  })

  it('has a row for every route file and no row without a route', () => {
    expect(routes.filter(r => !MATRIX[r])).toEqual([])
    expect(Object.keys(MATRIX).filter(r => !routes.includes(r))).toEqual([])
  })

  it('has a value for every route parameter', () => {
    expect([...new Set(routes.flatMap(r => routeParams(r)))].filter(name => !PARAM_VALUES[name])).toEqual([])
  })

  it('fills every parameter of a pattern, nested ones too, and refuses one it has no value for', () => {
    const values = { id: 'a1', token: 't/2', slug: 'x' }
    expect(concretePath('/api/clubs/[id]/links/[token]/[...slug]', values)).toBe('/api/clubs/a1/links/t%2F2/x')
    expect(routeParams('/api/clubs/[id]/links/[token]')).toEqual(['id', 'token'])
    expect(() => concretePath('/api/vessels/[tag]', values)).toThrow(/\[tag\]/)
  })

  const cases = routes.flatMap(route => (['anon', 'member', 'instructor', 'safety', 'admin'] as Who[])
    .map(who => [route, who] as const))

  it.each(cases)('%s as %s', async (route, who) => {
    const row = MATRIX[route]
    if (!row) return expect.fail(`no row for ${route}`)
    const [method, pattern] = route.split(' ') as [string, string]
    const path = concretePath(pattern, paramValues(pattern))
    // Signing out ends the session it is sent with, so it gets a session of its own, never the shared one.
    const as = who === 'anon' ? undefined : route === 'POST /api/auth/logout' ? await signIn(inject('baseUrl'), DEMO[who], DEMO.password) : who
    // An upload route takes multipart forms only (its request rule); it gets an empty one.
    const body = method === 'GET' ? undefined : requestRuleFor(method, path).mediaTypes.includes('multipart/form-data') ? new FormData() : {}
    const res = await api(path, { method, as, body })
    expect(res.status, `${route} as ${who}: ${JSON.stringify(res.body)?.slice(0, 200)}`).toBe(row[who])
  })
})
