import { describe, it, expect, beforeAll } from 'vitest'
import sharp from 'sharp'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, demoClubId, makeMember, makeTrainingSession, makeEnrolment, makeTrainingRecord, ago, type MadeMember } from '../../support/factories'
import { signInFromOwnAddress } from './sign-in'
import { testEnv } from '../../support/test-env'
import type { EvidenceDto, MyCourseDto, TrainingRecordDto, TrainingSessionDetailDto } from '../../../shared/types/training'
import type { Paged } from '../../../shared/types/common'

type Member = MadeMember & { cookie: string }
async function member(o: Parameters<typeof makeMember>[0] = {}): Promise<Member> {
  const m = await makeMember(o)
  return { ...m, cookie: await signInFromOwnAddress(m.email, m.password) }
}
const courseOf = async (cookie: string, code: string) => (await api<MyCourseDto[]>('/api/training/courses', { as: cookie })).body.find(c => c.code === code)!

let instructor: Member
let otherInstructor: Member
let safety: Member

beforeAll(async () => {
  [instructor, otherInstructor, safety] = await Promise.all([member({ roles: ['instructor'] }), member({ roles: ['instructor'] }), member({ roles: ['safety_officer'] })])
})

describe('a record holds every field a record must have', () => {
  // 29 CFR 1910.132(f)(4): the employer certifies training in writing with the name of each employee
  // trained, the date(s) of training and the subject of the certification. Ours also holds the trainer,
  // the result and the expiry; the table itself refuses a record without any of them.
  it.each(['trainee_name', 'trained_from', 'subject', 'trainer_name', 'result', 'expires_on'])('the database refuses a record without %s', async (column) => {
    const m = await makeMember()
    const clubId = await demoClubId()
    const [course] = await sql<{ id: string }>(`SELECT id FROM courses WHERE club_id = $1 AND code = 'first_aid'`, [clubId])
    const values: Record<string, unknown> = {
      club_id: clubId, membership_id: m.memberId, course_id: course!.id, trainee_name: m.name, subject: 'First aid',
      trained_from: clubDay(-1), trained_to: clubDay(-1), trainer_name: 'Someone Else', issued_by_membership_id: instructor.memberId,
      result: 'pass', expires_on: clubDay(700),
    }
    const insert = (v: Record<string, unknown>) => sql(`INSERT INTO training_records (${Object.keys(v).join(', ')}) VALUES (${Object.keys(v).map((_, i) => `$${i + 1}`).join(', ')})`, Object.values(v))
    await expect(insert({ ...values, [column]: null })).rejects.toThrow(/null value|violates/)
    if (['trainee_name', 'subject', 'trainer_name'].includes(column)) await expect(insert({ ...values, [column]: '  ' })).rejects.toThrow(/check constraint/)
    await expect(insert(values)).resolves.toEqual([])
  })
})

describe('running a session and issuing its records', () => {
  it('records attendance and the assessment, then issues the whole session in one step: passes, fails, nobody absent', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId, startsAt: ago('4 hours') })
    const [pass, lowScore, noSignOff, absent] = await Promise.all([member(), member(), member(), member()])
    // One after the other, so the trainees arrive (and are listed) in this order.
    const e = []
    for (const m of [pass, lowScore, noSignOff, absent]) e.push(await makeEnrolment({ sessionId, memberId: m!.memberId }))
    const entries = [
      { enrolmentId: e[0]!.enrolmentId, attended: true, theoryScorePercent: 92, practicalSignedOff: true },
      { enrolmentId: e[1]!.enrolmentId, attended: true, theoryScorePercent: 60, practicalSignedOff: true },
      { enrolmentId: e[2]!.enrolmentId, attended: true, theoryScorePercent: 85, practicalSignedOff: false },
      { enrolmentId: e[3]!.enrolmentId, attended: false, theoryScorePercent: null, practicalSignedOff: false },
    ]
    expect((await api(`/api/training/sessions/${sessionId}/attendance`, { method: 'PUT', as: 'member', body: { entries } })).status).toBe(403)
    const saved = await api<TrainingSessionDetailDto>(`/api/training/sessions/${sessionId}/attendance`, { method: 'PUT', as: instructor.cookie, body: { entries } })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    expect(saved.body.participants!.map(p => p.attended)).toEqual([true, true, true, false])

    expect((await api(`/api/training/sessions/${sessionId}/issue`, { as: instructor.cookie, body: { confirm: false } })).status).toBe(400)
    const issued = await api(`/api/training/sessions/${sessionId}/issue`, { as: instructor.cookie, body: { confirm: true } })
    expect(issued.status, JSON.stringify(issued.body)).toBe(200)
    expect(issued.body).toEqual({ issued: 3, passed: 1, failed: 2 })
    expect((await api(`/api/training/sessions/${sessionId}/issue`, { as: instructor.cookie, body: { confirm: true } })).body.data.reasons[0].code).toBe('ALREADY_ISSUED')

    const records = await api<TrainingRecordDto[]>('/api/training/records', { as: pass!.cookie })
    expect(records.body).toHaveLength(1)
    const r = records.body[0]!
    expect(r).toMatchObject({ traineeName: pass!.name, subject: 'Composite handling and PPE', trainerName: expect.any(String), result: 'pass', theoryScorePercent: 92, practicalSignedOff: true, takenElsewhere: false })
    expect(r.trainedFrom).toMatch(/^\d{4}-\d{2}-\d{2}$/)
    expect(r.expiresOn > r.trainedTo).toBe(true)
    expect((await courseOf(pass!.cookie, 'composite_ppe')).standing).toBe('current')
    expect((await courseOf(lowScore!.cookie, 'composite_ppe')).standing).toBe('never_taken')
    expect((await api<TrainingRecordDto[]>('/api/training/records', { as: noSignOff!.cookie })).body[0]!.result).toBe('fail')
    expect((await api<TrainingRecordDto[]>('/api/training/records', { as: absent!.cookie })).body).toEqual([])
    expect(await sql('SELECT 1 FROM audit_events WHERE action = $1 AND subject_id = $2', ['training.issue', sessionId])).toHaveLength(1)
    // Once issued the assessment stays as it was.
    expect((await api(`/api/training/sessions/${sessionId}/attendance`, { method: 'PUT', as: instructor.cookie, body: { entries } })).status).toBe(422)
  })

  it('nobody signs off or issues their own record (422), and the table refuses a self-issued one', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId, startsAt: ago('2 hours') })
    const { enrolmentId } = await makeEnrolment({ sessionId, memberId: otherInstructor.memberId })
    const own = await api(`/api/training/sessions/${sessionId}/attendance`, {
      method: 'PUT', as: otherInstructor.cookie, body: { entries: [{ enrolmentId, attended: true, theoryScorePercent: 95, practicalSignedOff: true }] },
    })
    expect(own.status).toBe(422)
    expect(own.body.data.reasons[0].code).toBe('OWN_RECORD')
    // Another instructor assesses them; they still may not issue the session that holds their own record.
    await api(`/api/training/sessions/${sessionId}/attendance`, { method: 'PUT', as: instructor.cookie, body: { entries: [{ enrolmentId, attended: true, theoryScorePercent: 95, practicalSignedOff: true }] } })
    const issueOwn = await api(`/api/training/sessions/${sessionId}/issue`, { as: otherInstructor.cookie, body: { confirm: true } })
    expect(issueOwn.status).toBe(422)
    expect(issueOwn.body.data.reasons[0].code).toBe('OWN_RECORD')
    expect(await sql('SELECT 1 FROM training_records WHERE membership_id = $1', [otherInstructor.memberId])).toEqual([])
    await expect(makeTrainingRecord({ memberId: otherInstructor.memberId, course: 'first_aid', trainerId: otherInstructor.memberId })).rejects.toThrow(/check constraint/)
    await expect(sql(`UPDATE training_enrolments SET practical_signed_off = true, signed_off_by_membership_id = membership_id WHERE id = $1`, [enrolmentId])).rejects.toThrow(/check constraint/)
    expect((await api(`/api/training/sessions/${sessionId}/issue`, { as: instructor.cookie, body: { confirm: true } })).body.issued).toBe(1)
  })

  it('refuses to issue a session that has not been held yet', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId })
    const res = await api(`/api/training/sessions/${sessionId}/issue`, { as: instructor.cookie, body: { confirm: true } })
    expect(res.body.data.reasons[0].code).toBe('NOT_HELD_YET')
  })
})

describe('the retraining flag', () => {
  it('makes a current record not current until a new one is issued; audited; only training.flag', async () => {
    const m = await member()
    const { recordId } = await makeTrainingRecord({ memberId: m.memberId, course: 'pressure_safety', trainerId: instructor.memberId, trainedOn: clubDay(-30) })
    expect((await courseOf(m.cookie, 'pressure_safety')).standing).toBe('current')
    expect((await api(`/api/training/records/${recordId}/retraining`, { as: m.cookie, body: { reason: 'changed_ppe' } })).status).toBe(403)
    expect((await api(`/api/training/records/${recordId}/retraining`, { as: safety.cookie, body: { reason: 'forgot' } })).status).toBe(400)
    const flagged = await api<TrainingRecordDto>(`/api/training/records/${recordId}/retraining`, { as: safety.cookie, body: { reason: 'changed_workshop', note: 'New extraction fitted.' } })
    expect(flagged.status).toBe(200)
    expect(flagged.body.retraining).toMatchObject({ reason: 'changed_workshop', note: 'New extraction fitted.' })
    expect((await courseOf(m.cookie, 'pressure_safety')).standing).toBe('retraining_required')
    expect((await api(`/api/training/records/${recordId}/retraining`, { as: safety.cookie, body: { reason: 'changed_ppe' } })).status).toBe(409)
    const audit = await sql<{ after: { retrainingReason: string } }>('SELECT after FROM audit_events WHERE action = $1 AND subject_id = $2', ['training.retraining', recordId])
    expect(audit.map(a => a.after.retrainingReason)).toEqual(['changed_workshop'])
    await makeTrainingRecord({ memberId: m.memberId, course: 'pressure_safety', trainerId: instructor.memberId, trainedOn: clubDay(0) })
    expect((await courseOf(m.cookie, 'pressure_safety')).standing).toBe('current')
  })
})

function form(fields: Record<string, string>, file?: { bytes: Buffer, name: string, type: string }): FormData {
  const f = new FormData()
  for (const [k, v] of Object.entries(fields)) f.append(k, v)
  if (file) f.append('file', new Blob([new Uint8Array(file.bytes)], { type: file.type }), file.name)
  return f
}
const PDF = Buffer.from('%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n')

describe('evidence files and courses taken elsewhere', () => {
  it('an instructor enters a course taken elsewhere with its evidence; the file is served to the member and officers only', async () => {
    const m = await member()
    const stranger = await member()
    const upload = await api<EvidenceDto>('/api/training/evidence', { as: instructor.cookie, body: form({ membershipId: m.memberId }, { bytes: PDF, name: 'certificate.pdf', type: 'application/pdf' }) })
    expect(upload.status, JSON.stringify(upload.body)).toBe(201)
    expect(upload.body.contentType).toBe('application/pdf')
    const png = await sharp({ create: { width: 40, height: 30, channels: 3, background: { r: 200, g: 10, b: 10 } } }).png().toBuffer()
    const image = await api<EvidenceDto>('/api/training/evidence', { as: instructor.cookie, body: form({ membershipId: m.memberId }, { bytes: png, name: 'card.pdf', type: 'application/pdf' }) })
    expect(image.body.contentType).toBe('image/png') // judged by its content, not its name
    const fake = await api('/api/training/evidence', { as: instructor.cookie, body: form({ membershipId: m.memberId }, { bytes: Buffer.from('<html><script>alert(1)</script>'), name: 'x.pdf', type: 'application/pdf' }) })
    expect(fake.status).toBe(415)
    expect((await api('/api/training/evidence', { as: m.cookie, body: form({ membershipId: m.memberId }, { bytes: PDF, name: 'c.pdf', type: 'application/pdf' }) })).status).toBe(403)

    const course = await courseOf(instructor.cookie, 'first_aid')
    const body = { membershipId: m.memberId, courseId: course.id, trainedFrom: clubDay(-20), trainedTo: clubDay(-19), trainerName: 'Harbour Rescue First Aid', evidenceIds: [upload.body.id] }
    expect((await api('/api/training/records', { as: instructor.cookie, body: { ...body, evidenceIds: [] } })).status).toBe(400)
    const made = await api<TrainingRecordDto>('/api/training/records', { as: instructor.cookie, body })
    expect(made.status, JSON.stringify(made.body)).toBe(201)
    expect(made.body).toMatchObject({ takenElsewhere: true, result: 'pass', trainerName: 'Harbour Rescue First Aid', traineeName: m.name, subject: 'First aid' })
    expect(made.body.evidence.map(e => e.id)).toEqual([upload.body.id])
    // The same file cannot back a second record; an instructor does not enter their own.
    expect((await api('/api/training/records', { as: instructor.cookie, body })).body.data.reasons[0].code).toBe('EVIDENCE_MISSING')
    expect((await api('/api/training/records', { as: instructor.cookie, body: { ...body, membershipId: instructor.memberId } })).body.data.reasons[0].code).toBe('OWN_RECORD')
    expect((await courseOf(m.cookie, 'first_aid')).latest?.takenElsewhere).toBe(true)

    const get = (cookie: string) => fetch(`${testEnv.baseUrl}${upload.body.url}`, { headers: { cookie } })
    for (const who of [m.cookie, instructor.cookie, safety.cookie]) {
      const res = await get(who)
      expect(res.status).toBe(200)
      expect(res.headers.get('content-type')).toBe('application/pdf')
      expect(res.headers.get('content-disposition')).toMatch(/^attachment/)
      expect(res.headers.get('x-content-type-options')).toBe('nosniff')
      expect(Buffer.from(await res.arrayBuffer()).equals(PDF)).toBe(true)
    }
    expect((await get(stranger.cookie)).status).toBe(404)
    expect((await api(upload.body.url, { as: 'admin' })).status).toBe(404) // the admin holds neither training right
    expect((await api(upload.body.url)).status).toBe(401)
    expect(await sql('SELECT 1 FROM audit_events WHERE action = $1 AND subject_id = $2', ['training.record_elsewhere', made.body.id])).toHaveLength(1)
  })
})

describe('courses and rosters', () => {
  it('the safety officer edits a course (validated, audited); an instructor may not', async () => {
    const course = await courseOf(safety.cookie, 'range_safety')
    const body = { name: course.name, description: `${course.description} Updated.`, validityMonths: 18, passMarkPercent: 75, practicalRequired: true }
    expect((await api(`/api/training/courses/${course.id}`, { method: 'PUT', as: instructor.cookie, body })).status).toBe(403)
    expect((await api(`/api/training/courses/${course.id}`, { method: 'PUT', as: safety.cookie, body: { ...body, validityMonths: 0 } })).status).toBe(400)
    const taken = await courseOf(safety.cookie, 'first_aid')
    expect((await api(`/api/training/courses/${course.id}`, { method: 'PUT', as: safety.cookie, body: { ...body, name: taken.name } })).status).toBe(409)
    const res = await api(`/api/training/courses/${course.id}`, { method: 'PUT', as: safety.cookie, body })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ code: 'range_safety', validityMonths: 18, passMarkPercent: 75 })
    const [audit] = await sql<{ before: Record<string, unknown>, after: Record<string, unknown> }>('SELECT before, after FROM audit_events WHERE action = $1 AND subject_id = $2', ['training.course', course.id])
    expect(audit!.after).toMatchObject({ validityMonths: 18, passMarkPercent: 75 })
    await api(`/api/training/courses/${course.id}`, { method: 'PUT', as: safety.cookie, body: { ...body, validityMonths: course.validityMonths, passMarkPercent: course.passMarkPercent, description: course.description } })
  })

  it('lists who is current in a course, a page at a time, for members.read only', async () => {
    const clubId = await demoClubId()
    const [current, expiring, expired, flagged] = await Promise.all([member(), member(), member(), member()])
    await makeTrainingRecord({ memberId: current.memberId, course: 'rig_operator', trainerId: instructor.memberId, trainedOn: clubDay(-10) })
    await makeTrainingRecord({ memberId: expiring.memberId, course: 'rig_operator', trainerId: instructor.memberId, trainedOn: clubDay(-700), expiresOn: clubDay(20) })
    await makeTrainingRecord({ memberId: expired.memberId, course: 'rig_operator', trainerId: instructor.memberId, trainedOn: clubDay(-800), expiresOn: clubDay(-1) })
    await makeTrainingRecord({ memberId: flagged.memberId, course: 'rig_operator', trainerId: instructor.memberId, trainedOn: clubDay(-10), retrainingReason: 'skill_not_retained' })
    const [course] = await sql<{ id: string }>(`SELECT id FROM courses WHERE club_id = $1 AND code = 'rig_operator'`, [clubId])
    expect((await api(`/api/training/courses/${course!.id}/roster`, { as: 'member' })).status).toBe(403)
    const all = await api<Paged<{ membershipId: string, standing: string }>>(`/api/training/courses/${course!.id}/roster`, { as: 'admin', query: { pageSize: 100 } })
    const mine = all.body.items.filter(r => [current, expiring, expired, flagged].some(m => m.memberId === r.membershipId))
    expect(Object.fromEntries(mine.map(r => [r.membershipId, r.standing]))).toEqual({ [current.memberId]: 'current', [expiring.memberId]: 'expiring' })
    const page = await api<Paged<unknown>>(`/api/training/courses/${course!.id}/roster`, { as: 'admin', query: { pageSize: 1, page: 2 } })
    expect(page.body.items).toHaveLength(1)
    expect(page.body.total).toBe(all.body.total)
  })
})

describe('training expiry notices', () => {
  it('queues the tightest warning reached (60, 30 or 7 days) once per record, without opt-out', async () => {
    const m = await member()
    await makeTrainingRecord({ memberId: m.memberId, course: 'respirator_fit', trainerId: instructor.memberId, trainedOn: clubDay(-340), expiresOn: clubDay(25) })
    await makeTrainingRecord({ memberId: m.memberId, course: 'composite_ppe', trainerId: instructor.memberId, trainedOn: clubDay(-700), expiresOn: clubDay(5) })
    await makeTrainingRecord({ memberId: m.memberId, course: 'first_aid', trainerId: instructor.memberId, trainedOn: clubDay(-10) })
    const scan = () => api('/api/outbox/run', { as: 'admin', method: 'POST' })
    expect((await scan()).status).toBe(200)
    await scan()
    const rows = await sql<{ kind: string, due_on: string, subject: string }>(`SELECT kind, due_on::text, subject FROM notices WHERE membership_id = $1 ORDER BY due_on`, [m.memberId])
    expect(rows.map(r => [r.kind, r.due_on])).toEqual([['training_expiring', clubDay(-5)], ['training_expiring', clubDay(-2)]])
    expect(rows.map(r => r.subject).sort()).toEqual([
      expect.stringMatching(/^Your Composite handling and PPE record expires on/),
      expect.stringMatching(/^Your Respirator fit test record expires on/),
    ])
  })
})
