// Erasure on request: a member with records in every domain is erased, and then their name, e-mail
// and phone are nowhere in the database (every text, varchar, json and jsonb column of every table,
// searched as the owner role) nor in the uploads folder, while every safety record is still counted.
import { randomInt } from 'node:crypto'
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Sequelize } from 'sequelize'
import { sql } from '../../support/db'
import { api } from '../../support/http'
import { testEnv } from '../../support/test-env'
import {
  clubDay, makeActionToken, makeBooking, makeClub, makeFill, makeFillStation, makeIncident, makeLaunchEvent, makeMember, makeNotice,
  makePayment, makePhoto, makeProofTest, makeRateLimit, makeStation, makeTier, makeTrainingRecord, makeVessel, setMembership, type MadeMember,
} from '../../support/factories'
import { signInFromOwnAddress } from '../training/sign-in'
import { createSequelize } from '../../../server/models'
import { reapplyErasures } from '../../../server/database/erasures'
import { scrubLegacyAuditRows } from '../../../server/database/migrations/0025-erasures'
import { pseudonymEmail, pseudonymName } from '../../../shared/utils/pseudonym'
import { emailKey } from '../../../server/services/accounts/sign-in-limits'

type Member = MadeMember & { cookie: string }

async function member(o: Parameters<typeof makeMember>[0] = {}): Promise<Member> {
  const m = await makeMember(o)
  return { ...m, cookie: await signInFromOwnAddress(m.email, m.password) }
}

const letters = () => Array.from({ length: 6 }, () => String.fromCharCode(97 + randomInt(26))).join('')

/** Where a text turns up: "table.column" for every text, varchar, json and jsonb column holding it (any case). */
async function whereInDatabase(text: string): Promise<string[]> {
  const columns = await sql<{ table_name: string, column_name: string }>(`
    SELECT c.table_name, c.column_name FROM information_schema.columns c
      JOIN information_schema.tables t ON t.table_schema = c.table_schema AND t.table_name = c.table_name AND t.table_type = 'BASE TABLE'
     WHERE c.table_schema = 'public' AND c.data_type IN ('text', 'character varying', 'json', 'jsonb')`)
  expect(columns.length).toBeGreaterThan(100)
  // One query: for each column, its name when some row holds the text.
  const probes = columns.map(c => `SELECT '${c.table_name}.${c.column_name}' AS at WHERE EXISTS (SELECT 1 FROM "${c.table_name}" WHERE strpos(lower("${c.column_name}"::text), lower($1)) > 0)`)
  return (await sql<{ at: string }>(probes.join(' UNION ALL '), [text])).map(r => r.at).sort()
}

/** Every file in the uploads folder whose name or bytes hold `text` (any case). */
function whereInUploads(text: string): string[] {
  if (!existsSync(testEnv.uploadsDir)) return []
  const needle = text.toLowerCase()
  return readdirSync(testEnv.uploadsDir).filter(name => name.toLowerCase().includes(needle)
    || readFileSync(join(testEnv.uploadsDir, name)).toString('latin1').toLowerCase().includes(needle)
    || readFileSync(join(testEnv.uploadsDir, name)).toString('utf8').toLowerCase().includes(needle))
}

/** The member's safety and money records: what the club keeps after an erasure. */
async function safetyCounts(memberId: string) {
  const [row] = await sql<Record<string, number>>(`SELECT
      (SELECT count(*)::int FROM fills WHERE membership_id = $1) AS fills,
      (SELECT count(*)::int FROM proof_tests p JOIN vessels v ON v.id = p.vessel_id WHERE v.owner_membership_id = $1) AS proof_tests,
      (SELECT count(*)::int FROM incidents WHERE reported_by_membership_id = $1) AS incidents_reported,
      (SELECT count(*)::int FROM incident_people WHERE membership_id = $1) AS incidents_involved,
      (SELECT count(*)::int FROM tier_signoffs WHERE membership_id = $1) AS tier_signoffs,
      (SELECT count(*)::int FROM member_tiers WHERE membership_id = $1) AS tiers,
      (SELECT count(*)::int FROM payments WHERE membership_id = $1) AS payments,
      (SELECT count(*)::int FROM training_records WHERE membership_id = $1 OR trainer_membership_id = $1) AS training_records,
      (SELECT count(*)::int FROM bookings WHERE membership_id = $1) AS bookings,
      (SELECT count(*)::int FROM vessels WHERE owner_membership_id = $1) AS vessels`, [memberId])
  return row!
}

/** Sign-in limiter rows keyed by `email`, in clear or as the limiter's hash of it. */
async function limiterRows(email: string): Promise<number> {
  const [row] = await sql<{ n: number }>('SELECT count(*)::int AS n FROM rate_limits WHERE strpos(key, $1) > 0 OR strpos(key, $2) > 0', [email, emailKey(email)])
  return row!.n
}

/** A customer at the payment fake, made through its API as the dues checkout does. */
async function fakeCustomer(email: string, name: string): Promise<string> {
  const res = await fetch(`${testEnv.paymentFakeUrl}/v1/customers`, {
    method: 'POST',
    headers: { 'authorization': `Bearer ${testEnv.paymentKeys.secretKey}`, 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ email, name }),
  })
  expect(res.status).toBe(200)
  return ((await res.json()) as { id: string }).id
}
const fakeCustomerStatus = async (id: string) => (await fetch(`${testEnv.paymentFakeUrl}/v1/customers/${id}`, {
  headers: { authorization: `Bearer ${testEnv.paymentKeys.secretKey}` },
})).status

function form(fields: Record<string, string>, file: { bytes: Buffer, name: string, type: string }): FormData {
  const f = new FormData()
  for (const [k, v] of Object.entries(fields)) f.append(k, v)
  f.append('file', new Blob([new Uint8Array(file.bytes)], { type: file.type }), file.name)
  return f
}

let admin: Member
let instructor: Member
let safety: Member
let owner: Sequelize

beforeAll(async () => {
  ;[admin, instructor, safety] = await Promise.all([
    member({ roles: ['admin'] }), member({ roles: ['instructor'] }), member({ roles: ['safety_officer', 'instructor'] })])
  owner = createSequelize(testEnv.databaseUrl)
})

afterAll(async () => {
  await owner?.close()
})

/** A member with records in every domain; returns them and what identifies them. */
async function memberEverywhere() {
  const tag = letters()
  const name = `Ottoline O'Farrow ${tag}`
  const email = `ottoline.${tag}@erase.test.hoopwise.example`
  const phone = `+44 7700 9${randomInt(10000, 99999)}`
  const m = await member({ name, email, roles: ['member', 'instructor'], phone, acceptWaiver: true })
  await setMembership(m.memberId, {
    birthDate: clubDay(-30 * 365), emergencyContactName: `Bram Farrow ${tag}`, emergencyContactPhone: '+44 7700 900999',
    guardianName: `Guardian Farrow ${tag}`, guardianEmail: `guardian.${tag}@erase.test.hoopwise.example`,
  })
  const other = await member()
  // Account and links: a second sign-in from another address, a failed one, a reset link, a sign-in limiter row.
  expect((await api('/api/auth/login', { body: { email, password: 'not-the-password-1' } })).status).toBe(401)
  await makeActionToken({ userId: m.userId, memberId: m.memberId, purpose: 'reset_password' })
  await makeRateLimit({ key: `mail-recipient:${email}`, points: 1 })
  expect(await limiterRows(email)).toBeGreaterThan(1)
  // Payments with a customer at the payment service.
  const customerId = await fakeCustomer(email, name)
  await makePayment({ memberId: m.memberId, customerId, reference: `Dues of ${name}` })
  // Training: their own record, one they trained, and evidence of a course taken elsewhere naming them.
  await makeTrainingRecord({ memberId: m.memberId, course: 'composite_ppe', trainerId: instructor.memberId })
  await makeTrainingRecord({ memberId: other.memberId, course: 'composite_ppe', trainerId: m.memberId })
  const pdf = Buffer.from(`%PDF-1.4\n% Certificate for ${name}, ${email}\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n`)
  const evidence = await api('/api/training/evidence', { as: instructor.cookie, body: form({ membershipId: m.memberId }, { bytes: pdf, name: `${name}.pdf`, type: 'application/pdf' }) })
  expect(evidence.status, JSON.stringify(evidence.body)).toBe(201)
  // Tiers and their sign-offs.
  await makeTier({ memberId: m.memberId, rank: 1, assessorId: safety.memberId })
  // A vessel named after them, with a build photo they uploaded, a proof test with its gauge photo.
  const vessel = await makeVessel({ ownerId: m.memberId, name: `${name}'s bottle`, state: 'in_service' })
  const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 40, g: 90, b: 160 } } }).jpeg().toBuffer()
  const photo = await api('/api/photos', { as: m.cookie, body: form({ purpose: 'build', vesselId: vessel.vesselId, caption: `Layup by ${name}` }, { bytes: jpeg, name: 'layup.jpg', type: 'image/jpeg' }) })
  expect(photo.status, JSON.stringify(photo.body)).toBe(201)
  const gauge = await makePhoto({ uploadedBy: instructor.memberId, vesselId: vessel.vesselId, purpose: 'gauge' })
  await makeProofTest({ vesselId: vessel.vesselId, witnessId: instructor.memberId, testedOn: clubDay(-10), gaugePhotoId: gauge.photoId })
  // Fills at a launch event.
  const station = await makeFillStation()
  const event = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(0), stationIds: [station.stationId], registeredIds: [m.memberId] })
  await makeFill({ eventId: event.eventId, stationId: station.stationId, memberId: m.memberId, vesselId: vessel.vesselId, recordedBy: safety.memberId })
  // A workshop booking with a note giving their phone.
  const bench = await makeStation()
  await makeBooking({ stationId: bench.stationId, memberId: m.memberId, startsAt: { interval: '2 days' }, endsAt: { interval: '2 days 1 hour' }, note: `Ring ${phone} if late` })
  // Incidents: one they reported, one another reported that involves them and names them.
  await makeIncident({ reportedBy: m.memberId, kind: 'near_miss', whatHappened: `${name} saw the cap lift at 4 bar.` })
  await makeIncident({ reportedBy: safety.memberId, kind: 'burst', peopleIds: [m.memberId], whatHappened: `Bottle burst next to ${name.toUpperCase()}; call ${phone}.` })
  // A roster import waiting with a staging row for them (the file names them too).
  const [job] = await sql<{ id: string }>(`INSERT INTO import_jobs (club_id, created_by_membership_id, file_bytes, delimiter, headings, preview)
    SELECT club_id, $1, 10, ',', '["name","email"]', '[]' FROM memberships WHERE id = $1 RETURNING id`, [safety.memberId])
  await sql(`INSERT INTO import_rows (job_id, line, cells, email, outcome, row_values) VALUES ($1, 2, $2, $3, 'update', '{}')`,
    [job!.id, JSON.stringify([name, email, phone]), email])
  // Notices sent to them, and one to an officer that names them.
  await makeNotice({ memberId: m.memberId, subjectKey: 'welcome', status: 'sent', subject: `Welcome, ${name}`, textBody: `Hello ${name} (${email}, ${phone})`, htmlBody: `<p>Hello ${name.replace('\'', '&#39;')}</p>` })
  await makeNotice({ memberId: m.memberId, subjectKey: 'consent', status: 'queued', toEmail: `guardian.${tag}@erase.test.hoopwise.example`, textBody: `Consent for ${name}` })
  await makeNotice({ memberId: safety.memberId, subjectKey: `near-miss-${tag}`, status: 'sent', textBody: `${name} reported a near miss.` })
  return { m, other, tag, name, email, phone, customerId, vessel }
}

describe('POST /api/members/[id]/erase', () => {
  it('erases a member with records in every domain: their name, e-mail and phone are nowhere, every safety record stays', async () => {
    const x = await memberEverywhere()
    const identifying = [x.name, x.email, x.phone, `Bram Farrow ${x.tag}`, `guardian.${x.tag}@erase.test.hoopwise.example`]
    // The search finds them everywhere before, so it would find a leftover after.
    expect(await whereInDatabase(x.name)).toEqual(expect.arrayContaining(['users.name', 'incidents.what_happened', 'notices.text_body', 'training_records.trainee_name', 'vessels.name', 'photos.caption', 'waiver_acceptances.typed_name']))
    expect(await whereInDatabase(x.email)).toEqual(expect.arrayContaining(['users.email', 'rate_limits.key', 'notices.text_body', 'import_rows.email', 'import_rows.cells']))
    expect(await whereInDatabase(x.phone)).toEqual(expect.arrayContaining(['memberships.phone', 'bookings.note']))
    expect(whereInUploads(x.name).length).toBe(1)
    const before = await safetyCounts(x.m.memberId)
    expect(Object.values(before).every(n => n > 0), JSON.stringify(before)).toBe(true)

    const wrongName = await api(`/api/members/${x.m.memberId}/erase`, { as: admin.cookie, body: { confirmName: 'Someone Else', reason: 'Asked by e-mail' } })
    expect(wrongName.status).toBe(422)
    expect(wrongName.body.data.reasons[0].code).toBe('ERASE_NAME_MISMATCH')

    const res = await api(`/api/members/${x.m.memberId}/erase`, { as: admin.cookie, body: { confirmName: ` ${x.name.toUpperCase()} `, reason: `${x.name} asked by e-mail on the 3rd` } })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toEqual({ membershipId: x.m.memberId, pseudonym: pseudonymName(x.m.memberId), paymentCustomersDeleted: 1, filesRemoved: 3 })

    for (const text of identifying) {
      expect(await whereInDatabase(text), text).toEqual([])
      expect(whereInUploads(text), text).toEqual([])
    }
    expect(await safetyCounts(x.m.memberId)).toEqual(before)
    // The pseudonym stands where the name was; the membership is resigned and personal fields are gone.
    const [row] = await sql<Record<string, unknown>>(`SELECT u.name, u.email, u.password_hash, m.phone, m.birth_date, m.guardian_name,
        m.emergency_contact_name, m.resigned_at IS NOT NULL AS resigned FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1`, [x.m.memberId])
    expect(row).toEqual({ name: pseudonymName(x.m.memberId), email: pseudonymEmail(x.m.memberId), password_hash: null, phone: null, birth_date: null, guardian_name: null, emergency_contact_name: null, resigned: true })
    const [trained] = await sql<{ trainer_name: string }>('SELECT trainer_name FROM training_records WHERE membership_id = $1', [x.other.memberId])
    expect(trained!.trainer_name).toBe(pseudonymName(x.m.memberId))
    expect(await sql('SELECT 1 FROM sessions WHERE user_id = $1 AND (revoked_at IS NULL OR address <> \'\' OR user_agent IS NOT NULL)', [x.m.userId])).toEqual([])
    expect(await sql('SELECT 1 FROM action_tokens WHERE user_id = $1', [x.m.userId])).toEqual([])
    expect(await sql('SELECT 1 FROM notices WHERE membership_id = $1 AND status = \'queued\'', [x.m.memberId])).toEqual([])
    // The customer record is gone at the payment service.
    expect(await fakeCustomerStatus(x.customerId)).toBe(404)
    expect(await limiterRows(x.email)).toBe(0)
    // The audit event says who erased whom, by id, with the reason minus the name.
    const [audit] = await sql<{ actor_membership_id: string, reason: string, after: Record<string, unknown> }>(
      'SELECT actor_membership_id, reason, after FROM audit_events WHERE action = \'member.erase\' AND subject_id = $1', [x.m.memberId])
    expect(audit).toEqual({ actor_membership_id: admin.memberId, reason: `${pseudonymName(x.m.memberId)} asked by e-mail on the 3rd`, after: { status: 'resigned', paymentCustomersDeleted: 1, personalUploads: 2 } })

    // The account cannot sign in; the e-mail signs up afresh as a new account.
    expect((await api('/api/auth/login', { body: { email: x.email, password: x.m.password } })).status).toBe(401)
    const fresh = await api('/api/auth/signup', { body: { name: 'Ottoline Anew', email: x.email, password: 'a-long-password-1', birthDate: clubDay(-30 * 365) } })
    expect(fresh.status, JSON.stringify(fresh.body)).toBe(201)
    expect(fresh.body.user.id).not.toBe(x.m.userId)
    // A second erasure of the same member is refused.
    const again = await api(`/api/members/${x.m.memberId}/erase`, { as: admin.cookie, body: { confirmName: pseudonymName(x.m.memberId), reason: 'Twice' } })
    expect(again.status).toBe(422)
    expect(again.body.data.reasons[0].code).toBe('ALREADY_ERASED')
  })

  it('refuses one\'s own membership, and a member of another club is not found', async () => {
    const self = await api(`/api/members/${admin.memberId}/erase`, { as: admin.cookie, body: { confirmName: admin.name, reason: 'Testing myself' } })
    expect(self.status).toBe(422)
    expect(self.body.data.reasons[0].code).toBe('ERASE_SELF')
    const club = await makeClub({ name: `Erase Elsewhere ${letters()}`, tagPrefix: 'ERS' })
    const outsider = await makeMember({ clubId: club.id })
    const res = await api(`/api/members/${outsider.memberId}/erase`, { as: admin.cookie, body: { confirmName: outsider.name, reason: 'Not ours' } })
    expect(res.status).toBe(404)
    const [row] = await sql<{ name: string }>('SELECT name FROM users WHERE id = $1', [outsider.userId])
    expect(row!.name).toBe(outsider.name)
  })
})

describe('reapplyErasures (what a restore runs)', () => {
  it('erases again a member a restored backup brought back, and leaves the erased alone', async () => {
    const x = await memberEverywhere()
    expect((await api(`/api/members/${x.m.memberId}/erase`, { as: admin.cookie, body: { confirmName: x.name, reason: 'Asked in person' } })).status).toBe(200)
    expect(await reapplyErasures(owner, { uploadsDir: testEnv.uploadsDir })).toBe(0)

    // A backup from before the erasure, restored: the old values are back in the account, membership, a notice and an incident.
    await sql('UPDATE users SET name = $2, email = $3, password_hash = $4 WHERE id = $1', [x.m.userId, x.name, x.email, 'scrypt$restored'])
    await setMembership(x.m.memberId, { phone: x.phone, birthDate: clubDay(-30 * 365), resignedAt: null })
    await makeNotice({ memberId: x.m.memberId, subjectKey: 'restored', status: 'sent', textBody: `Hello ${x.name}` })
    await makeIncident({ reportedBy: x.m.memberId, whatHappened: `${x.name} again` })
    await makePhoto({ uploadedBy: x.m.memberId, vesselId: x.vessel.vesselId, purpose: 'build', caption: `By ${x.name}` })
    expect(await whereInDatabase(x.name)).not.toEqual([])

    expect(await reapplyErasures(owner, { uploadsDir: testEnv.uploadsDir })).toBe(1)
    for (const text of [x.name, x.email, x.phone]) expect(await whereInDatabase(text), text).toEqual([])
    const [row] = await sql<{ password_hash: string | null, resigned: boolean }>(`SELECT u.password_hash, m.resigned_at IS NOT NULL AS resigned
      FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1`, [x.m.memberId])
    expect(row).toEqual({ password_hash: null, resigned: true })
    // A member missing from the list in the database is erased when the restore passes the list on.
    const y = await memberEverywhere()
    expect(await reapplyErasures(owner, { uploadsDir: testEnv.uploadsDir, entries: [{ membershipId: y.m.memberId, userId: y.m.userId, clubId: (await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [y.m.memberId]))[0]!.club_id }] })).toBe(1)
    expect(await whereInDatabase(y.email)).toEqual([])
  })
})

describe('the one-time scrub of audit events written before they named people by id', () => {
  it('removes names, e-mails and the guardian from old rows about a member, and audits the scrub', async () => {
    const club = await makeClub({ name: `Scrub Club ${letters()}`, tagPrefix: 'SCR' })
    const m = await makeMember({ clubId: club.id })
    const tag = letters()
    const insert = (action: string, after: object | null, reason: string | null) => sql(`INSERT INTO audit_events (club_id, actor_name, action, subject_type, subject_id, after, reason)
      VALUES ($1, 'System', $2, 'membership', $3, $4, $5)`, [club.id, action, m.memberId, after && JSON.stringify(after), reason])
    await insert('member.signed_up', { email: `old.${tag}@club.example`, name: `Old Name ${tag}`, junior: true, guardianEmail: `g.${tag}@club.example` }, null)
    await insert('member.guardian_consent', { guardianConsentAt: '2026-01-01T10:00:00.000Z' }, `Consent confirmed by the guardian (Gail ${tag}, g.${tag}@club.example) from the e-mailed link`)
    await insert('member.edit', { changed: ['phone'] }, 'Kept as it is')

    expect(await scrubLegacyAuditRows(owner)).toBeGreaterThanOrEqual(2)
    for (const text of [tag]) expect(await whereInDatabase(text)).toEqual([])
    const rows = await sql<{ action: string, after: Record<string, unknown>, reason: string | null }>(
      'SELECT action, after, reason FROM audit_events WHERE club_id = $1 ORDER BY created_at, action', [club.id])
    expect(rows).toEqual(expect.arrayContaining([
      { action: 'member.signed_up', after: { junior: true, changed: expect.arrayContaining(['email', 'name', 'guardianEmail']) }, reason: null },
      { action: 'member.guardian_consent', after: { guardianConsentAt: '2026-01-01T10:00:00.000Z' }, reason: 'Consent confirmed by the guardian from the e-mailed link' },
      { action: 'member.edit', after: { changed: ['phone'] }, reason: 'Kept as it is' },
      { action: 'audit.personal_data_scrubbed', after: { rows: 2 }, reason: expect.stringMatching(/migration 0025/) },
    ]))
    // The trail is append-only again for the application.
    await expect(sql('UPDATE audit_events SET reason = NULL WHERE club_id = $1', [club.id], testEnv.appDatabaseUrl)).rejects.toThrow()
  })
})
