import { randomBytes, randomUUID } from 'node:crypto'
import { mkdir, writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import yauzl from 'yauzl'
import { api, sessionCookieOf } from '../../support/http'
import { testEnv } from '../../support/test-env'
import {
  NOW, ago, clubDay, fromNow, makeAuditEvent, makeBooking, makeFill, makeFillStation, makeIncident, makeLaunchEvent, makeMember, makeNotice,
  makePhoto, makeStation, makeTier, makeTrainingRecord, makeVessel, type MadeMember,
} from '../../support/factories'
import { planId } from '../dues/support'

// "Download my data": the ZIP is read back with a ZIP reader; every file is there with the member's
// own values, and nothing of another member's.

/** Every entry of a ZIP, by name. */
function unzip(buffer: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(buffer, { lazyEntries: true }, (err, zip) => {
      if (err) return reject(err)
      const files = new Map<string, Buffer>()
      zip.on('entry', (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (e, stream) => {
          if (e) return reject(e)
          const chunks: Buffer[] = []
          stream.on('data', (c: Buffer) => chunks.push(c))
          stream.on('end', () => {
            files.set(entry.fileName, Buffer.concat(chunks))
            zip.readEntry()
          })
        })
      })
      zip.on('end', () => resolve(files))
      zip.on('error', reject)
      zip.readEntry()
    })
  })
}

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

const tag = randomUUID().slice(0, 6)
let me: MadeMember
let other: MadeMember
let officer: MadeMember
const ids: Record<string, string> = {}
const photoBytes = randomBytes(2048)
const OTHERS_INJURY = `Cut thumb of the other flyer ${tag}`

beforeAll(async () => {
  me = await makeMember({ name: `Mira Datahold ${tag}`, phone: '+44 7700 900123' })
  other = await makeMember({ name: `Otto Elsewhere ${tag}`, phone: '+44 7700 900999' })
  officer = await makeMember({ name: `Ivo Instructs ${tag}`, roles: ['instructor', 'safety_officer'] })

  // Vessels, with a photo file behind the first one's photo.
  const mine = await makeVessel({ ownerId: me.memberId, name: `Mira's bottle ${tag}`, state: 'in_service' })
  const theirs = await makeVessel({ ownerId: other.memberId, name: `Otto's bottle ${tag}`, state: 'in_service' })
  ids.vessel = mine.vesselId
  ids.photo = (await makePhoto({ uploadedBy: me.memberId, vesselId: mine.vesselId, caption: `Layup day ${tag}` })).photoId
  await makePhoto({ uploadedBy: other.memberId, vesselId: theirs.vesselId, caption: `Otto's layup ${tag}` })
  await mkdir(testEnv.uploadsDir, { recursive: true })
  await writeFile(join(testEnv.uploadsDir, `${ids.photo}.jpg`), photoBytes)

  // Payments (an admin records them), training, tiers.
  const plan = await planId('adult')
  for (const [m, reference] of [[me, `Mira envelope ${tag}`], [other, `Otto envelope ${tag}`]] as const) {
    const res = await api('/api/dues/payments', { as: 'admin', body: { memberId: m.memberId, planId: plan, method: 'cash', amountMinor: 6000, paidOn: clubDay(-1), reference } })
    expect(res.status).toBe(200)
  }
  await makeTrainingRecord({ memberId: me.memberId, course: 'pressure_safety', trainerId: officer.memberId, trainedOn: clubDay(-40) })
  await makeTrainingRecord({ memberId: other.memberId, course: 'composite_ppe', trainerId: officer.memberId, trainedOn: clubDay(-40) })
  await makeTier({ memberId: me.memberId, rank: 1, signedOn: clubDay(-30), expiresOn: clubDay(300) })
  await makeTier({ memberId: other.memberId, rank: 2, signedOn: clubDay(-30), expiresOn: clubDay(300) })

  // Fills at an event: two of mine, one of the other member's.
  const { stationId } = await makeFillStation({ name: `Data launcher ${tag}`, gaugeCalibratedOn: clubDay(-5) })
  const { eventId } = await makeLaunchEvent({ createdBy: officer.memberId, heldOn: clubDay(-3), site: `Data field ${tag}`, stationIds: [stationId] })
  await makeFill({ eventId, stationId, memberId: me.memberId, vesselId: mine.vesselId, pressureBar: 6.5 })
  await makeFill({ eventId, stationId, memberId: me.memberId, vesselId: mine.vesselId, pressureBar: 8, reasons: [{ code: 'TIER_CAP_EXCEEDED', message: 'Refused in a test' }] })
  await makeFill({ eventId, stationId, memberId: other.memberId, vesselId: theirs.vesselId, pressureBar: 7 })

  // Bookings, a year ago and next week.
  const { stationId: bench } = await makeStation({ name: `Data bench ${tag}` })
  await makeBooking({ stationId: bench, memberId: me.memberId, startsAt: ago('400 days'), endsAt: ago('399 days 22 hours'), note: `Mira's old layup ${tag}` })
  await makeBooking({ stationId: bench, memberId: me.memberId, startsAt: fromNow('7 days'), endsAt: fromNow('7 days 2 hours'), note: `Mira's next layup ${tag}` })
  await makeBooking({ stationId: bench, memberId: other.memberId, startsAt: fromNow('8 days'), endsAt: fromNow('8 days 2 hours'), note: `Otto's layup ${tag}` })

  // Incidents: one I reported naming the other member (their injury), one only about me, one the other reported.
  ids.withOther = (await makeIncident({ reportedBy: me.memberId, kind: 'injury', peopleIds: [me.memberId, other.memberId], injuryDetails: OTHERS_INJURY, vesselId: mine.vesselId })).incidentId
  ids.alone = (await makeIncident({ reportedBy: me.memberId, kind: 'injury', peopleIds: [me.memberId], injuryDetails: `My own graze ${tag}` })).incidentId
  await makeIncident({ reportedBy: other.memberId, kind: 'near_miss' })

  // Notices and audit events.
  await makeNotice({ memberId: me.memberId, subject: `Your dues ${tag}`, textBody: `Dear Mira ${tag}`, status: 'sent', sentAt: NOW })
  await makeNotice({ memberId: other.memberId, subject: `Otto's dues ${tag}`, textBody: `Dear Otto ${tag}` })
  await makeAuditEvent({ actorMemberId: officer.memberId, action: 'member.roles', subjectType: 'membership', subjectId: me.memberId, reason: `Mira helps at the field ${tag}` })
  await makeAuditEvent({ actorMemberId: officer.memberId, action: 'member.roles', subjectType: 'membership', subjectId: other.memberId, reason: `Otto helps too ${tag}` })
})

describe('Download my data', () => {
  it('streams a ZIP with a README, one JSON file per kind of record and the vessel photos, all the member\'s own', async () => {
    const res = await fetch(new URL('/api/me/data-export', testEnv.baseUrl), { headers: { cookie: await signInAs(me) } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('application/zip')
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="my-data-\d{4}-\d{2}-\d{2}\.zip"$/)
    const files = await unzip(Buffer.from(await res.arrayBuffer()))
    const jsonFiles = ['account.json', 'membership.json', 'payments.json', 'training.json', 'tiers.json', 'vessels.json', 'fills.json',
      'bookings.json', 'incidents.json', 'notices.json', 'audit-events.json']
    expect([...files.keys()].sort()).toEqual(['README.txt', ...jsonFiles, `photos/${ids.photo}.jpg`].sort())
    const json = Object.fromEntries(jsonFiles.map(f => [f, JSON.parse(files.get(f)!.toString('utf8'))]))

    const readme = files.get('README.txt')!.toString('utf8')
    for (const f of [...jsonFiles, 'photos/']) expect(readme).toContain(f)
    expect(readme).toContain(me.name)

    expect(json['account.json']).toMatchObject({ name: me.name, email: me.email, emailConfirmed: true })
    expect(json['membership.json']).toMatchObject({ id: me.memberId, phone: '+44 7700 900123', status: 'active' })
    expect(json['payments.json'].map((p: { reference: string, amountMinor: number }) => [p.reference, p.amountMinor])).toEqual([[`Mira envelope ${tag}`, 6000]])
    expect(json['training.json'].map((r: { courseCode: string, traineeName: string }) => [r.courseCode, r.traineeName])).toEqual([['pressure_safety', me.name]])
    expect(json['tiers.json'].held.map((t: { rank: number, state: string }) => [t.rank, t.state])).toEqual([[1, 'valid']])
    const [vessel] = json['vessels.json']
    expect(json['vessels.json']).toHaveLength(1)
    expect(vessel).toMatchObject({ id: ids.vessel, name: `Mira's bottle ${tag}` })
    expect(vessel.photos).toEqual([expect.objectContaining({ id: ids.photo, caption: `Layup day ${tag}`, file: `photos/${ids.photo}.jpg` })])
    expect(files.get(`photos/${ids.photo}.jpg`)!.equals(photoBytes)).toBe(true)
    expect(json['fills.json'].map((f: { pressureBar: number, allowed: boolean }) => [f.pressureBar, f.allowed]).sort()).toEqual([[6.5, true], [8, false]])
    expect(json['bookings.json'].map((b: { note: string }) => b.note).sort()).toEqual([`Mira's next layup ${tag}`, `Mira's old layup ${tag}`])

    const incidents = new Map(json['incidents.json'].map((i: { id: string }) => [i.id, i]))
    expect([...incidents.keys()].sort()).toEqual([ids.withOther, ids.alone].sort())
    expect(incidents.get(ids.alone)).toMatchObject({ injuryDetails: `My own graze ${tag}`, otherPeopleInvolved: 0, youWereInvolved: true })
    expect(incidents.get(ids.withOther)).toMatchObject({ otherPeopleInvolved: 1, vesselTag: expect.any(String) })

    // The test's notice and the receipt the cash payment queued: every one addressed to the member.
    const notices = json['notices.json'].map((n: { subject: string, toEmail: string }) => [n.subject, n.toEmail])
    expect(notices).toContainEqual([`Your dues ${tag}`, me.email])
    expect(notices.every(([, to]: string[]) => to === me.email)).toBe(true)
    const reasons = json['audit-events.json'].map((a: { reason: string | null }) => a.reason)
    expect(reasons).toContain(`Mira helps at the field ${tag}`)
    expect(json['audit-events.json'].find((a: { reason: string | null }) => a.reason === `Mira helps at the field ${tag}`).by).toBe(officer.name)

    // Nothing of the other member's anywhere in the ZIP: name, e-mail, phone, records, the injury they suffered.
    const everything = [...files.entries()].filter(([name]) => !name.startsWith('photos/')).map(([, b]) => b.toString('utf8')).join('\n')
    for (const theirs of [other.name, other.email, '900999', other.memberId, `Otto envelope ${tag}`, `Otto's bottle ${tag}`, `Otto's layup ${tag}`,
      `Otto's dues ${tag}`, `Otto helps too ${tag}`, OTHERS_INJURY]) {
      expect(everything, theirs).not.toContain(theirs)
    }
  })

  it('needs a signed-in member', async () => {
    expect((await api('/api/me/data-export')).status).toBe(401)
  })
})
