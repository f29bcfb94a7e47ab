// The club's public page (`GET /api/front-door`) and its settings (`/api/front-door/settings`), on a
// database and server of this file's own: the page lists the club's next sessions and events, which
// every other test file adds to in the shared database, so only here is "the next one" this file's.
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startAppServer } from '../../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { prepareDatabase } from '../../../scripts/lib/database.mjs'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { testEnv, serverEnv, DEMO } from '../../support/test-env'
import { signIn } from '../../support/global-setup'
import { clubDay, demoClubId, fromNow, makeEnrolment, makeLaunchEvent, makeMember, makeTrainingSession } from '../../support/factories'
import { FRONT_DOOR_LIMITS, FRONT_DOOR_SECTIONS } from '../../../shared/schemas/club'
import type { FrontDoorSettingsDto, PublicFrontDoorDto } from '../../../shared/types/clubs'

const OWN = 'hoopwise_test_front_door'
const APP_PORT = TEST.spareBase + 5
const baseUrl = `http://127.0.0.1:${APP_PORT}`
const onDb = (url: string, database: string) => url.replace(/\/[^/]+$/, `/${database}`)
const serverDbUrl = onDb(testEnv.databaseUrl, 'postgres')
const db = onDb(testEnv.databaseUrl, OWN)
const appDb = onDb(testEnv.appDatabaseUrl, OWN)

let server: Awaited<ReturnType<typeof startAppServer>> | undefined
const cookies: Record<'admin' | 'safety' | 'member', string> = { admin: '', safety: '', member: '' }
let settings: FrontDoorSettingsDto
/** Everyone's names and e-mails in this database: none may appear on the public page. */
let people: { name: string, email: string }[] = []

const publicPage = () => api<PublicFrontDoorDto>('/api/front-door', { baseUrl })
const save = (body: unknown, as = cookies.admin) => api<FrontDoorSettingsDto>('/api/front-door/settings', { baseUrl, method: 'PUT', as, body })

beforeAll(async () => {
  await sql(`DROP DATABASE IF EXISTS ${OWN} WITH (FORCE)`, [], serverDbUrl)
  await sql(`CREATE DATABASE ${OWN}`, [], serverDbUrl)
  await prepareDatabase({ databaseUrl: appDb, ownerUrl: db, publicUrl: baseUrl, seed: true, log: () => {} })
  server = await startAppServer({ root: ROOT, port: APP_PORT, env: serverEnv({ NUXT_DATABASE_URL: appDb, NUXT_PUBLIC_URL: baseUrl }) })
  cookies.admin = await signIn(baseUrl, DEMO.admin, DEMO.password)
  cookies.safety = await signIn(baseUrl, DEMO.safety, DEMO.password)
  cookies.member = await signIn(baseUrl, DEMO.member, DEMO.password)
  settings = (await api<FrontDoorSettingsDto>('/api/front-door/settings', { baseUrl, as: cookies.admin })).body
})

afterAll(async () => {
  await server?.stop()
  await sql(`DROP DATABASE IF EXISTS ${OWN} WITH (FORCE)`, [], serverDbUrl)
})

describe('GET /api/front-door: the club\'s public page', () => {
  let sessionId: string
  let eventId: string
  let cancelledId: string

  beforeAll(async () => {
    const clubId = await demoClubId(db)
    const [instructor] = await sql<{ id: string }>(`SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [DEMO.instructor], db)
    const trainee = await makeMember({ name: 'Ottoline Vesper-Quist', db })
    // Sooner than any seeded session: this one comes first, with one of its three places taken.
    sessionId = (await makeTrainingSession({ instructorId: instructor!.id, clubId, startsAt: fromNow('2 minutes'), capacity: 3, place: 'Harbour shed', db })).sessionId
    await makeEnrolment({ sessionId, memberId: trainee.memberId, db })
    // Events: one cancelled for today (never shown) and one today that is.
    cancelledId = (await makeLaunchEvent({ createdBy: instructor!.id, heldOn: clubDay(0), site: 'Cancelled flats', cancelled: true, registeredIds: [trainee.memberId], db })).eventId
    eventId = (await makeLaunchEvent({ createdBy: instructor!.id, heldOn: clubDay(0), site: 'Saltmarsh field', registeredIds: [trainee.memberId], staffIds: [instructor!.id], db })).eventId
    // Events seeded for today came first; this file's event is among today's in the order made.
    people = await sql<{ name: string, email: string }>('SELECT name, email FROM users', [], db)
  })

  it('answers anyone, without a session: the club\'s name, texts, dues with prices, next sessions with spaces left and events', async () => {
    const res = await publicPage()
    expect(res.status).toBe(200)
    const [club] = await sql<{ name: string }>('SELECT name FROM clubs WHERE id = $1', [await demoClubId(db)], db)
    expect(res.body.name).toBe(club!.name)
    const plans = await sql<{ name: string, price_minor: number }>('SELECT name, price_minor FROM dues_plans ORDER BY name', [], db)
    expect(plans.length).toBeGreaterThan(0)
    expect(res.body.dues!.map(p => [p.name, p.priceMinor]).sort()).toEqual(plans.map(p => [p.name, p.price_minor]).sort())
    expect(res.body.training![0]).toMatchObject({ id: sessionId, place: 'Harbour shed', spacesLeft: 2 })
    expect(res.body.training!.length).toBeLessThanOrEqual(3)
    const ids = res.body.events!.map(e => e.id)
    expect(ids).not.toContain(cancelledId)
    const [expected] = await sql<{ ids: string[] }>(`SELECT coalesce(array_agg(id ORDER BY held_on, created_at, id), '{}') AS ids FROM (
      SELECT id, held_on, created_at FROM launch_events WHERE held_on >= $1 AND cancelled_at IS NULL ORDER BY held_on, created_at, id LIMIT 3) e`, [clubDay(0)], db)
    expect(ids).toEqual(expected!.ids)
    expect(expected!.ids).toContain(eventId)
    expect(res.body.calculator).toBe(true)
    expect(res.body.passCheck).toBe(true)
  })

  it('holds no member\'s name or e-mail, nor any member or instructor id', async () => {
    const text = JSON.stringify((await publicPage()).body)
    expect(people.length).toBeGreaterThan(4)
    for (const p of people) {
      expect(text).not.toContain(p.email)
      expect(text).not.toContain(p.name)
    }
    const ids = await sql<{ id: string }>('SELECT id FROM memberships', [], db)
    for (const { id } of ids) expect(text).not.toContain(id)
    expect(text).not.toMatch(/@/)
  })

  it('shows the admin\'s texts, and a section switched off is absent from the answer', async () => {
    const body = {
      ...settings,
      description: 'We build and fly water rockets on the marsh.\nNewcomers welcome.',
      meetsWhere: 'The harbour shed, Quay Lane',
      meetsWhen: 'Saturdays 10:00–13:00',
      joiningNote: 'Come to a Saturday first.',
      show: { ...settings.show, dues: false, events: false },
    }
    const saved = await save(body)
    expect(saved.status).toBe(200)
    expect(saved.body).toEqual(body)
    const res = await publicPage()
    expect(res.body).toMatchObject({ description: body.description, meetings: { where: body.meetsWhere, when: body.meetsWhen }, joining: { note: body.joiningNote } })
    expect(res.body).not.toHaveProperty('dues')
    expect(res.body).not.toHaveProperty('events')
    expect(res.body.training!.length).toBeGreaterThan(0)

    const allOff = await save({ ...body, show: Object.fromEntries(FRONT_DOOR_SECTIONS.map(s => [s, false])) })
    expect(allOff.status).toBe(200)
    expect(Object.keys((await publicPage()).body).sort()).toEqual(['description', 'name', 'timeZone'])

    const [audit] = await sql<{ after: { changed: string[] } }>(`SELECT after FROM audit_events WHERE action = 'club.front_door' ORDER BY created_at DESC LIMIT 1`, [], db)
    expect(audit!.after.changed).toEqual(expect.arrayContaining(['show.training', 'show.calculator']))
    expect((await save(settings)).status).toBe(200)
  })

  it('renders the page at / on the server for a visitor, with the texts and Open Graph tags', async () => {
    expect((await save({ ...settings, description: 'Rockets, water and air.' })).status).toBe(200)
    const res = await fetch(`${baseUrl}/`)
    expect(res.status).toBe(200)
    const html = await res.text()
    expect(html).toContain('Rockets, water and air.')
    expect(html).toContain('Harbour shed')
    expect(html).toMatch(/<meta[^>]+property="og:title"/)
    expect(html).toContain(`<meta property="og:url" content="${baseUrl}/">`)
    expect(html).toContain(`${baseUrl}/og-image.png`)
    expect(html).toMatch(/<meta name="description" content="Rockets, water and air\.">/)
    for (const p of people) expect(html).not.toContain(p.email)
  })
})

describe('PUT /api/front-door/settings: the admin edits the public page', () => {
  it('refuses anyone but an admin: 401 signed out, 403 for a member and the safety officer', async () => {
    expect((await save(settings, '')).status).toBe(401)
    expect((await save(settings, cookies.member)).status).toBe(403)
    expect((await save(settings, cookies.safety)).status).toBe(403)
  })

  it.each([
    ['a description one character too long', { description: 'x'.repeat(FRONT_DOOR_LIMITS.description + 1) }, 'description'],
    ['a joining note one character too long', { joiningNote: 'x'.repeat(FRONT_DOOR_LIMITS.joiningNote + 1) }, 'joiningNote'],
    ['an empty name', { name: '  ' }, 'name'],
    ['a name on two lines', { name: 'Salt\nMarsh' }, 'name'],
    ['a control character', { meetsWhere: 'Quay\u0007Lane' }, 'meetsWhere'],
    ['a switch that is not yes or no', { show: { ...Object.fromEntries(FRONT_DOOR_SECTIONS.map(s => [s, true])), dues: 'yes' } }, 'show.dues'],
    ['an unknown section', { show: { ...Object.fromEntries(FRONT_DOOR_SECTIONS.map(s => [s, true])), gallery: true } }, null],
  ])('refuses %s with 400 and changes nothing', async (_, change, field) => {
    const before = (await publicPage()).body
    const res = await save({ ...settings, ...change })
    expect(res.status).toBe(400)
    if (field) expect(Object.keys((res.body as unknown as { data: { fields: Record<string, string> } }).data.fields)).toContain(field)
    expect((await publicPage()).body).toEqual(before)
  })

  it('the database refuses a text over the limit that bypasses the schema', async () => {
    const clubId = await demoClubId(db)
    await expect(sql(`INSERT INTO club_front_doors (club_id, description) VALUES ($1, $2)
      ON CONFLICT (club_id) DO UPDATE SET description = EXCLUDED.description`, [clubId, 'x'.repeat(601)], db)).rejects.toThrow(/check constraint/)
  })
})
