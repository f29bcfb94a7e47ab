import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { PDFParse } from 'pdf-parse'
import { api, sessionCookieOf } from '../../support/http'
import { ago, clubDay, makeClub, makeFill, makeFillStation, makeIncident, makeLaunchEvent, makeMember, makeProofTest, makeTier, makeTrainingRecord, makeVessel, type MadeMember } from '../../support/factories'
import { JOINING_CAUTION, PRESSURE_CAUTION } from '../../../shared/utils/wording'

// The pack of a club of the test's own, so every count in it is exact.

const tag = randomUUID().slice(0, 5)
const as = { safety: '', admin: '', member: '' }
let officer: MadeMember
let adult: MadeMember
let junior: MadeMember
let benched: MadeMember
let lapsed: MadeMember
let vessel: { vesselId: string, tag: string }
let quarantined: { vesselId: string, tag: string }
const site = `Field ${tag}`
const oldSite = `Old ${tag}`
const injury = `Cut on the left thumb ${tag}`

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

/** The pack as text, one page per entry (cells of a row on one line, joined by spaces). */
async function pack(cookie: string, query = ''): Promise<{ status: number, type: string | null, pages: string[], text: string }> {
  const res = await fetch(new URL(`/api/audit/evidence-pack${query}`, inject('baseUrl')), { headers: { cookie } })
  if (res.status !== 200) return { status: res.status, type: res.headers.get('content-type'), pages: [], text: await res.text() }
  const parser = new PDFParse({ data: new Uint8Array(await res.arrayBuffer()) })
  const result = await parser.getText()
  await parser.destroy()
  return { status: res.status, type: res.headers.get('content-type'), pages: result.pages.map(p => p.text), text: result.text }
}

/** The line of `text` holding `needle` (the row of a table). */
function lineWith(text: string, needle: string): string {
  const line = text.split('\n').find(l => l.includes(needle))
  expect(line, `no line with ${needle}`).toBeDefined()
  return line!
}

const flat = (text: string) => text.replace(/\s+/g, ' ')

beforeAll(async () => {
  const club = await makeClub({ name: `Pack Club ${tag}`, tagPrefix: 'PAK' })
  const clubId = club.id
  officer = await makeMember({ clubId, roles: ['instructor', 'safety_officer'], name: `Petra ${tag}` })
  const admin = await makeMember({ clubId, roles: ['admin'], name: `Ada ${tag}` })
  const member = await makeMember({ clubId, name: `Milo ${tag}` })
  adult = await makeMember({ clubId, name: `Ansel ${tag}` })
  junior = await makeMember({ clubId, name: `Juno ${tag}`, birthDate: clubDay(-14 * 365) })
  benched = await makeMember({ clubId, name: `Bram ${tag}` })
  lapsed = await makeMember({ clubId, name: `Lena ${tag}` })
  // Enough members for the members table to run over several pages.
  for (let i = 0; i < 55; i += 11) {
    await Promise.all(Array.from({ length: 11 }, (_, k) => makeMember({ clubId, name: `Filler ${String(i + k).padStart(2, '0')} ${tag}` })))
  }
  Object.assign(as, { safety: await signInAs(officer), admin: await signInAs(admin), member: await signInAs(member) })

  await makeTier({ memberId: adult.memberId, rank: 2, assessorId: officer.memberId, signedOn: clubDay(-10) })
  await makeTrainingRecord({ memberId: adult.memberId, course: 'rig_operator', trainerId: officer.memberId, trainedOn: clubDay(-10) })
  await makeTrainingRecord({ memberId: adult.memberId, course: 'first_aid', trainerId: officer.memberId, trainedOn: clubDay(-10) })
  await makeTier({ memberId: junior.memberId, rank: 3, assessorId: officer.memberId, signedOn: clubDay(-10) })
  await makeTier({ memberId: benched.memberId, rank: 2, assessorId: officer.memberId, signedOn: clubDay(-10), suspended: true })
  await makeTrainingRecord({ memberId: lapsed.memberId, course: 'safety_briefing', trainerId: officer.memberId, trainedOn: clubDay(-400) })

  vessel = await makeVessel({ ownerId: adult.memberId, name: `Bottle ${tag}`, state: 'in_service' })
  await makeProofTest({ vesselId: vessel.vesselId, witnessId: officer.memberId, testedOn: clubDay(-300), pressureBar: 12 })
  await makeProofTest({ vesselId: vessel.vesselId, witnessId: officer.memberId, testedOn: clubDay(-20), pressureBar: 15 })
  quarantined = await makeVessel({ ownerId: adult.memberId, name: `Held ${tag}`, state: 'quarantined' })

  const { stationId } = await makeFillStation({ clubId })
  const { eventId } = await makeLaunchEvent({ createdBy: officer.memberId, heldOn: clubDay(-30), site, stationIds: [stationId] })
  const fill = { eventId, stationId, memberId: adult.memberId, vesselId: vessel.vesselId }
  await makeFill(fill)
  await makeFill(fill)
  await makeFill({ ...fill, supervisorId: officer.memberId })
  for (let i = 0; i < 2; i++) await makeFill({ ...fill, pressureBar: 12, reasons: [{ code: 'TIER_CAP_EXCEEDED', message: 'Above the tier cap' }] })
  const { eventId: oldEvent } = await makeLaunchEvent({ createdBy: officer.memberId, heldOn: clubDay(-400), site: oldSite, stationIds: [stationId] })
  await makeFill({ ...fill, eventId: oldEvent })

  await makeIncident({ reportedBy: member.memberId, kind: 'injury', injuryDetails: injury, vesselId: vessel.vesselId, eventId, peopleIds: [adult.memberId], happenedAt: ago('30 days') })
  await makeIncident({ reportedBy: member.memberId, kind: 'burst', vesselId: quarantined.vesselId, closed: true, happenedAt: ago('5 days') })
  await makeIncident({ reportedBy: member.memberId, kind: 'uncommanded_launch', happenedAt: ago('400 days') })
}, 60_000)

describe('the evidence pack', () => {
  it('prints the club, the period, every section and the figures built for the test, for the last 12 months by default', async () => {
    const { status, type, text } = await pack(as.safety)
    expect(status).toBe(200)
    expect(type).toBe('application/pdf')
    expect(text).toContain(`Pack Club ${tag}`)
    for (const section of ['Summary', 'Safety policy', 'Tier table', 'Members', 'Vessels in service', 'Launch events', 'Incidents', 'Cautions']) expect(text).toContain(section)

    // Summary: 62 members, 1 vessel in service, 1 event (the old one is outside the period), 3 fills (1 supervised), 2 refused, 2 incidents (1 open).
    expect(lineWith(text, 'Members with a valid tier')).toMatch(/tier 2$/)
    expect(lineWith(text, 'Vessels in service ')).toMatch(/^Vessels in service 1$/)
    expect(lineWith(text, 'Launch events in the period')).toMatch(/period 1$/)
    expect(lineWith(text, 'Fills in the period')).toMatch(/period 3 \(1 supervised\)$/)
    expect(lineWith(text, 'Fill attempts refused')).toMatch(/refused 2$/)
    expect(lineWith(text, 'Incidents in the period')).toMatch(/period 2 \(1 open\)$/)
    expect(text).toMatch(/\nMembers 62\n/)

    // Members: the tier they may use today and the courses they are current in.
    expect(lineWith(text, adult.name)).toContain('T2 Reinforced')
    expect(lineWith(text, adult.name)).toMatch(/First aid, Hydrostatic test rig operator$/)
    expect(lineWith(text, junior.name)).toContain('T1 Bottle (junior; holds T3)')
    expect(lineWith(text, benched.name)).toContain('No valid tier')
    expect(lineWith(text, lapsed.name)).toMatch(/No valid tier None$/)

    // Vessels in service: the last passing proof with its pressure, rated fill and witness; nothing quarantined.
    const row = lineWith(text, vessel.tag)
    for (const part of [`Bottle ${tag}`, adult.name, clubDay(-20), '15.00 bar', '10.00 bar', officer.name]) expect(row).toContain(part)
    expect(row).not.toContain('12.00 bar')
    expect(text).not.toContain(`Held ${tag}`)

    // Launch events: fills, supervised, refused.
    expect(lineWith(text, site)).toMatch(/25\.00 bar 3 1 2$/)
    expect(text).not.toContain(oldSite)

    // Incidents: kind and outcome, never the injury details.
    expect(lineWith(text, ' Injury ')).toContain('Open: under review')
    expect(lineWith(text, ' Burst ')).toContain(`Closed on ${clubDay(0)}`)
    expect(text).not.toContain('Uncommanded launch')
    expect(text).not.toContain(injury)

    // Policy values, the tier table and the cautions.
    expect(lineWith(text, 'Equipment factor')).toMatch(/stations 3$/)
    expect(lineWith(text, 'Junior cap')).toMatch(/most\) T1 Bottle$/)
    expect(lineWith(text, 'Proof margin')).toMatch(/fill\) 1\.5$/)
    expect(lineWith(text, 'T4 Senior')).toContain('25.00 bar')
    expect(flat(text)).toContain(PRESSURE_CAUTION)
    expect(flat(text)).toContain(JOINING_CAUTION)
  })

  it('repeats the members table\'s title and headings on the pages it continues to', async () => {
    const { pages } = await pack(as.admin)
    const continued = pages.filter(p => p.includes('Members (continued)'))
    expect(continued.length).toBeGreaterThan(0)
    for (const page of continued) expect(page).toContain('Member Membership Valid tier Current courses')
    expect(pages.join('\n').match(/Member Membership Valid tier Current courses/g)!.length).toBe(continued.length + 1)
  })

  it('covers the period asked for', async () => {
    const { status, text } = await pack(as.safety, `?from=${clubDay(-500)}&to=${clubDay(-100)}`)
    expect(status).toBe(200)
    expect(lineWith(text, oldSite)).toMatch(/25\.00 bar 1 0 0$/)
    expect(text).not.toContain(site)
    expect(lineWith(text, ' Uncommanded launch ')).toContain('Open: under review')
    expect(lineWith(text, 'Incidents in the period')).toMatch(/period 1 \(1 open\)$/)
  })

  it('is refused to members (403) and for a bad period (400)', async () => {
    expect((await pack(as.member)).status).toBe(403)
    for (const query of [`?from=${clubDay(0)}&to=${clubDay(-1)}`, '?from=2026-02-30', '?to=yesterday', `?from=${clubDay(-6 * 366)}&to=${clubDay(0)}`]) {
      const res = await api(`/api/audit/evidence-pack${query}`, { as: as.safety })
      expect(res.status, query).toBe(400)
      expect(Object.keys(res.body.data.fields).length, query).toBeGreaterThan(0)
    }
  })
})
