import sharp from 'sharp'
import { describe, it, expect, beforeAll } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeTier, makeVessel } from '../../support/factories'
import { codes, logFills, person, tierClub, tierPost, type Person, type TierClub } from '../tiers/support'
import type { IncidentDto, IncidentListItemDto, IncidentPersonChoiceDto, IncidentVesselDto } from '../../../shared/types/incidents'
import type { Paged } from '../../../shared/types/common'

// Each test works in a club of its own making (the tier files' club): its safety officers are known,
// so the notices of a report can be counted exactly.
let c: TierClub
let secondOfficer: Person
beforeAll(async () => {
  c = await tierClub()
  secondOfficer = await person(c.clubId, ['safety_officer'])
})

const hourAgo = () => new Date(Date.now() - 3_600_000).toISOString()
/** An incident as answered, or a refusal's body. */
type Answer = IncidentDto & { data?: { reasons?: { code: string }[] } }
const report = (who: Person, body: Record<string, unknown>) => api<Answer>('/api/incidents', {
  method: 'POST', as: who.cookie, body: { kind: 'near_miss', happenedAt: hourAgo(), place: 'North pad', whatHappened: 'The release let go early.', ...body },
})
const read = (who: Person, id: string) => api<IncidentDto>(`/api/incidents/${id}`, { as: who.cookie })
const vesselState = async (id: string) => (await sql<{ state: string }>('SELECT state FROM vessels WHERE id = $1', [id]))[0]!.state
const auditActions = async (subjectId: string) => (await sql<{ action: string }>('SELECT action FROM audit_events WHERE subject_id = $1 ORDER BY created_at, id', [subjectId])).map(r => r.action)

describe('reporting an incident', () => {
  it('quarantines the named vessel — another member\'s — in the same transaction, audits both and e-mails every safety officer', async () => {
    const owner = await person(c.clubId)
    const reporter = await person(c.clubId)
    const { vesselId, tag } = await makeVessel({ ownerId: owner.memberId, state: 'in_service' })
    const res = await report(reporter, { kind: 'burst', vesselTag: tag.toLowerCase(), eventId: c.eventId, peopleIds: [owner.memberId] })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ kind: 'burst', status: 'open', vessel: { id: vesselId, tag }, vesselState: 'quarantined', event: { id: c.eventId }, people: [{ membershipId: owner.memberId }] })
    expect(await vesselState(vesselId)).toBe('quarantined')
    // One transaction wrote the report, its person, the vessel's state, its log row and both audit rows: the same xid.
    const [x] = await sql<{ incident: string, person: string, vessel: string, log: string, audits: string[] }>(
      `SELECT (SELECT xmin::text FROM incidents WHERE id = $1) AS incident,
              (SELECT xmin::text FROM incident_people WHERE incident_id = $1) AS person,
              (SELECT xmin::text FROM vessels WHERE id = $2) AS vessel,
              (SELECT xmin::text FROM vessel_events WHERE vessel_id = $2 AND kind = 'incident') AS log,
              ARRAY(SELECT DISTINCT xmin::text FROM audit_events WHERE subject_id IN ($1, $2)) AS audits`, [res.body.id, vesselId])
    expect(x!.incident).toBeTruthy()
    expect(x!.audits).toHaveLength(1)
    expect(new Set([x!.incident, x!.person, x!.vessel, x!.log, ...x!.audits])).toEqual(new Set([x!.incident]))
    expect(await auditActions(res.body.id)).toEqual(['incident.report'])
    expect(await auditActions(vesselId)).toEqual(['vessel.quarantine'])
    const notices = await sql<{ kind: string, membership_id: string, text_body: string }>('SELECT kind, membership_id, text_body FROM notices WHERE subject_key = $1 ORDER BY membership_id', [res.body.id])
    expect(notices.map(n => n.membership_id)).toEqual([c.safety.memberId, secondOfficer.memberId].sort())
    expect(notices.every(n => n.kind === 'incident_reported' && n.text_body.includes(tag))).toBe(true)
  })

  it('refuses a report with a person from another club or an unknown tag, and then quarantines nothing', async () => {
    const owner = await person(c.clubId)
    const { vesselId, tag } = await makeVessel({ ownerId: owner.memberId, state: 'in_service' })
    const outsider = await person((await tierClub()).clubId)
    const res = await report(owner, { vesselTag: tag, peopleIds: [outsider.memberId] })
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual(['PERSON_NOT_IN_CLUB'])
    expect(await vesselState(vesselId)).toBe('in_service')
    expect(codes((await report(owner, { vesselTag: 'ZZZZ-9999' })).body)).toEqual(['NO_SUCH_VESSEL'])
    expect(codes((await report(owner, { happenedAt: new Date(Date.now() + 86_400_000).toISOString() })).body)).toEqual(['INCIDENT_IN_FUTURE'])
    expect((await report(owner, { injuryDetails: 'Cut on the left hand' })).status).toBe(400)
    expect(await sql('SELECT id FROM incidents WHERE reported_by_membership_id = $1', [owner.memberId])).toEqual([])
  })
})

describe('who sees a report', () => {
  it('shows the reporter their own report, officers every report, and an injury\'s personal details to the safety officer only', async () => {
    const reporter = await person(c.clubId)
    const other = await person(c.clubId)
    const details = `Burn to the right forearm ${Date.now()}`
    const res = await report(reporter, { kind: 'injury', injuryDetails: details })
    expect(res.status).toBe(201)
    const id = res.body.id
    expect(res.body).toMatchObject({ injuryDetailsGiven: true, injuryDetails: null, canReview: false })
    expect((await read(c.safety, id)).body).toMatchObject({ injuryDetails: details, canReview: true })
    const asAdmin = await read(c.admin, id)
    expect(asAdmin.status).toBe(200)
    expect(asAdmin.body).toMatchObject({ injuryDetailsGiven: true, injuryDetails: null, canReview: false })
    expect((await read(other, id)).status).toBe(404)
    expect((await read(c.instructor, id)).status).toBe(404)
    const list = async (who: Person) => (await api<Paged<IncidentListItemDto>>('/api/incidents', { as: who.cookie, query: { pageSize: '100' } })).body.items.map(i => i.id)
    expect(await list(reporter)).toEqual([id])
    expect(await list(other)).toEqual([])
    expect(await list(c.admin)).toContain(id)
    expect(await list(c.safety)).toContain(id)
    // The audit trail and the officers' e-mails never carry the personal details.
    expect(await sql(`SELECT id FROM audit_events WHERE (before::text || after::text || coalesce(reason, '')) LIKE $1`, [`%${details}%`])).toEqual([])
    expect(await sql('SELECT id FROM notices WHERE text_body LIKE $1', [`%${details}%`])).toEqual([])
  })

  it('keeps an incident photo to those who see the incident', async () => {
    const reporter = await person(c.clubId)
    const other = await person(c.clubId)
    const { body: incident } = await report(reporter, {})
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#aa3300' } }).png().toBuffer()
    const form = new FormData()
    form.append('purpose', 'incident')
    form.append('incidentId', incident.id)
    form.append('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'pad.png')
    expect((await api('/api/photos', { method: 'POST', as: other.cookie, body: form })).status).toBe(404)
    const up = await api('/api/photos', { method: 'POST', as: reporter.cookie, body: form })
    expect(up.status, JSON.stringify(up.body)).toBe(201)
    expect((await read(reporter, incident.id)).body.photos.map(p => p.id)).toEqual([up.body.id])
    expect((await api(`/api/photos/${up.body.id}`, { as: reporter.cookie })).status).toBe(200)
    expect((await api(`/api/photos/${up.body.id}`, { as: c.safety.cookie })).status).toBe(200)
    expect((await api(`/api/photos/${up.body.id}`, { as: other.cookie })).status).toBe(404)
  })
})

describe('the incidents naming one member', () => {
  it('lists for an officer only the incidents naming the person, and for a member still only their own reports', async () => {
    const involved = await person(c.clubId)
    const reporter = await person(c.clubId)
    const { body: naming } = await report(reporter, { peopleIds: [involved.memberId] })
    const { body: other } = await report(reporter, {})
    const { body: byOfficer } = await report(c.safety, { peopleIds: [involved.memberId] })
    const list = async (who: Person, query: Record<string, string>) => (await api<Paged<IncidentListItemDto>>('/api/incidents', { as: who.cookie, query: { pageSize: '100', ...query } })).body.items.map(i => i.id)
    expect((await list(c.safety, { person: involved.memberId })).sort()).toEqual([naming.id, byOfficer.id].sort())
    expect(await list(c.safety, {})).toEqual(expect.arrayContaining([naming.id, other.id, byOfficer.id]))
    expect(await list(reporter, { person: involved.memberId })).toEqual([naming.id])
    expect(await list(involved, { person: involved.memberId })).toEqual([])
  })
})

describe('the safety officer\'s review', () => {
  it('reviews, suspends the tier of a person involved, closes — and the vessel stays quarantined until released', async () => {
    const involved = await person(c.clubId)
    const bystander = await person(c.clubId)
    await makeTier({ memberId: involved.memberId, rank: 1 })
    await makeTier({ memberId: bystander.memberId, rank: 1 })
    const { vesselId, tag } = await makeVessel({ ownerId: involved.memberId, state: 'in_service' })
    const { body: incident } = await report(bystander, { kind: 'uncommanded_launch', vesselTag: tag, peopleIds: [involved.memberId] })
    const id = incident.id
    const put = (who: Person, body: unknown) => api<Answer>(`/api/incidents/${id}/review`, { method: 'PUT', as: who.cookie, body })
    const post = (who: Person, path: string, body: unknown) => api(`/api/incidents/${id}/${path}`, { method: 'POST', as: who.cookie, body })

    expect((await put(bystander, { findings: 'Mine' })).status).toBe(403)
    const reviewed = await put(c.safety, { reviewNotes: 'Spoke to both', findings: 'Worn release pin', actions: 'Replace the pin on pad 2' })
    expect(reviewed.status).toBe(200)
    expect(reviewed.body).toMatchObject({ reviewNotes: 'Spoke to both', findings: 'Worn release pin', actions: 'Replace the pin on pad 2' })

    expect(codes((await post(c.safety, 'suspensions', { membershipId: bystander.memberId, rank: 1, reason: 'Not involved' })).body)).toEqual(['NOT_INVOLVED'])
    expect((await post(bystander, 'suspensions', { membershipId: involved.memberId, rank: 1, reason: 'x' })).status).toBe(403)
    const suspended = await post(c.safety, 'suspensions', { membershipId: involved.memberId, rank: 1, reason: 'Launched before the call' })
    expect(suspended.status, JSON.stringify(suspended.body)).toBe(200)
    expect(suspended.body.held[0]).toMatchObject({ rank: 1, state: 'suspended' })
    expect(await auditActions(involved.memberId)).toContain('tier.suspend')
    expect((await sql<{ kind: string }>('SELECT kind FROM notices WHERE membership_id = $1', [involved.memberId])).map(n => n.kind)).toContain('tier_suspended')

    expect((await post(c.admin, 'close', { outcome: 'x' })).status).toBe(403)
    const closed = await post(c.safety, 'close', { outcome: 'Pin replaced; tier suspended until retrained' })
    expect(closed.status).toBe(200)
    expect(closed.body).toMatchObject({ status: 'closed', closedBy: { membershipId: c.safety.memberId }, canReview: false })
    // Closing releases nothing: the vessel stays quarantined.
    expect(await vesselState(vesselId)).toBe('quarantined')
    expect(codes((await put(c.safety, { findings: 'Later' })).body)).toEqual(['INCIDENT_CLOSED'])
    expect(codes((await post(c.safety, 'close', { outcome: 'Again' })).body)).toEqual(['INCIDENT_CLOSED'])
    expect(await auditActions(id)).toEqual(['incident.report', 'incident.review', 'incident.suspend_tier', 'incident.close'])
    const closedNotices = await sql<{ membership_id: string }>(`SELECT membership_id FROM notices WHERE subject_key = $1 AND kind = 'incident_closed'`, [id])
    expect(closedNotices.map(n => n.membership_id)).toEqual([bystander.memberId])

    // Only the quarantine's release moves it on — to awaiting proof, never straight into service.
    const released = await api(`/api/vessels/${vesselId}/release`, { method: 'POST', as: c.safety.cookie, body: { reason: 'Reviewed after the incident' } })
    expect(released.status).toBe(200)
    expect(await vesselState(vesselId)).toBe('awaiting_proof')
    // Released once: a release is only from quarantine.
    const again = await api(`/api/vessels/${vesselId}/release`, { method: 'POST', as: c.safety.cookie, body: { reason: 'Twice' } })
    expect(codes(again.body)).toEqual(['NOT_QUARANTINED'])
    // A leaking proof test leaves it awaiting proof; only a passing one returns it to service.
    const proof = (result: string) => api(`/api/vessels/${vesselId}/proof-tests`, {
      method: 'POST', as: c.instructor.cookie, body: { pressure: 16, unit: 'bar', result, ...(result === 'pass' ? {} : { failureLocation: 'end_fitting' }) },
    })
    expect((await proof('leak')).status).toBe(201)
    expect(await vesselState(vesselId)).toBe('awaiting_proof')
    expect((await proof('pass')).status).toBe(201)
    expect(await vesselState(vesselId)).toBe('in_service')
    expect(await auditActions(vesselId)).toEqual(expect.arrayContaining(['vessel.quarantine', 'vessel.release']))
  })
})

describe('open incidents and tier renewal', () => {
  it('holds back the renewal of a person involved while the incident is open', async () => {
    const m = await person(c.clubId)
    await makeTier({ memberId: m.memberId, rank: 1, signedOn: clubDay(-100) })
    await logFills(c, m, 4)
    const { body: incident } = await report(c.instructor, { peopleIds: [m.memberId] })
    const refused = await tierPost(c.instructor, m.memberId, '/1/renewal', {})
    expect(refused.status).toBe(422)
    expect(codes(refused.body)).toEqual(['OPEN_INCIDENT'])
    expect((await api(`/api/incidents/${incident.id}/close`, { method: 'POST', as: c.safety.cookie, body: { outcome: 'Nothing to answer' } })).status).toBe(200)
    expect((await tierPost(c.instructor, m.memberId, '/1/renewal', {})).status).toBe(201)
  })
})

describe('the report form\'s look-ups', () => {
  it('finds members by part of the name for any member — ids and names only, current members of the club only', async () => {
    const stamp = `Quillon${Date.now().toString(36)}`
    const asker = await person(c.clubId)
    const [named, lapsed, suspended] = await Promise.all([
      person(c.clubId, [], { name: `Ada ${stamp}` }),
      person(c.clubId, [], { name: `Bea ${stamp}`, paidDays: -400 }),
      person(c.clubId, [], { name: `Cy ${stamp}`, suspendedReason: 'Unpaid' }),
    ])
    await person(c.clubId, [], { name: `Dee ${stamp}`, resigned: true })
    await person(c.clubId, [], { name: `Eve ${stamp}`, approved: false })
    await person((await tierClub()).clubId, [], { name: `Fay ${stamp}` })
    const res = await api<{ items: IncidentPersonChoiceDto[] }>('/api/incidents/people', { as: asker.cookie, query: { q: stamp.toLowerCase() } })
    expect(res.status).toBe(200)
    // Whoever is still a member, whatever their dues or a suspension (leaving those out would tell who is suspended).
    expect(res.body.items).toEqual([named, lapsed, suspended].map(p => ({ membershipId: p.memberId, name: p.name })))
    // Not a way round the directory: a part of an e-mail finds nobody, and wildcards are taken literally.
    expect((await api<{ items: unknown[] }>('/api/incidents/people', { as: asker.cookie, query: { q: named.email.split('@')[0]! } })).body.items).toEqual([])
    expect((await api<{ items: unknown[] }>('/api/incidents/people', { as: asker.cookie, query: { q: '%%' } })).body.items).toEqual([])
    expect((await api('/api/incidents/people', { as: asker.cookie, query: { q: 'a' } })).status).toBe(400)
    expect((await api('/api/incidents/people', { query: { q: stamp } })).status).toBe(401)
  })

  it('refuses a report naming a resigned or unapproved member, as the search offers neither', async () => {
    const reporter = await person(c.clubId)
    const resigned = await person(c.clubId, [], { resigned: true })
    const unapproved = await person(c.clubId, [], { approved: false })
    for (const p of [resigned, unapproved]) expect(codes((await report(reporter, { peopleIds: [p.memberId] })).body)).toEqual(['PERSON_NOT_IN_CLUB'])
    const suspended = await person(c.clubId, [], { suspendedReason: 'Unpaid' })
    expect((await report(reporter, { peopleIds: [suspended.memberId] })).status).toBe(201)
  })

  it('looks up any vessel of the club by its tag for any member — tag, name and state only', async () => {
    const owner = await person(c.clubId)
    const asker = await person(c.clubId)
    const { tag } = await makeVessel({ ownerId: owner.memberId, state: 'in_service', name: 'Grey Heron' })
    const res = await api<IncidentVesselDto>(`/api/incidents/vessels/${tag.toLowerCase()}`, { as: asker.cookie })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ tag, name: 'Grey Heron', state: 'in_service' })
    // The vessel page stays the owner's: the asker may not read it there.
    expect((await api(`/api/vessels/by-tag/${tag}`, { as: asker.cookie })).status).toBe(404)
    // Another club's vessel is not this club's to report.
    const elsewhere = await tierClub()
    const stranger = await person(elsewhere.clubId)
    expect((await api(`/api/incidents/vessels/${tag}`, { as: stranger.cookie })).status).toBe(404)
    expect((await api('/api/incidents/vessels/not-a-tag', { as: asker.cookie })).status).toBe(404)
  })
})
