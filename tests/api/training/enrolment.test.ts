import { describe, it, expect, beforeAll } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeMember, makeTrainingSession, makeEnrolment, setMembership, ago, type MadeMember } from '../../support/factories'
import { signInFromOwnAddress } from './sign-in'
import type { SessionPlaceDto, TrainingSessionDetailDto } from '../../../shared/types/training'

type Member = MadeMember & { cookie: string }
async function member(o: Parameters<typeof makeMember>[0] = {}): Promise<Member> {
  const m = await makeMember(o)
  return { ...m, cookie: await signInFromOwnAddress(m.email, m.password) }
}

const enrol = (cookie: string, sessionId: string) => api<SessionPlaceDto & { data?: { reasons: { code: string }[] } }>(`/api/training/sessions/${sessionId}/enrolment`, { method: 'POST', as: cookie })
const withdraw = (cookie: string, sessionId: string) => api(`/api/training/sessions/${sessionId}/enrolment`, { method: 'DELETE', as: cookie })

let instructor: Member

beforeAll(async () => {
  instructor = await member({ roles: ['instructor'] })
})

describe('scheduling a session', () => {
  it('an instructor schedules one on the club\'s wall clock (summer time included); a member may not', async () => {
    const year = new Date().getUTCFullYear() + 1
    const course = (await api<{ id: string, code: string }[]>('/api/training/courses', { as: instructor.cookie })).body.find(c => c.code === 'composite_ppe')!
    const body = { courseId: course.id, startsAt: `${year}-07-01T18:00`, endsAt: `${year}-07-01T21:00`, place: 'Laminating bay', capacity: 6 }
    const res = await api<TrainingSessionDetailDto>('/api/training/sessions', { as: instructor.cookie, body })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    // 18:00 in London in July is 17:00 UTC (British Summer Time); in January it would be 18:00.
    expect(res.body.startsAt).toBe(`${year}-07-01T17:00:00.000Z`)
    expect(res.body.participants).toEqual([])
    const winter = await api<TrainingSessionDetailDto>('/api/training/sessions', { as: instructor.cookie, body: { ...body, startsAt: `${year}-01-10T18:00`, endsAt: `${year}-01-10T20:00` } })
    expect(winter.body.startsAt).toBe(`${year}-01-10T18:00:00.000Z`)
    expect((await api('/api/training/sessions', { as: 'member', body })).status).toBe(403)
    const past = await api('/api/training/sessions', { as: instructor.cookie, body: { ...body, startsAt: '2020-01-01T10:00', endsAt: '2020-01-01T12:00' } })
    expect(past.status).toBe(422)
    expect(past.body.data.reasons[0].code).toBe('SESSION_IN_PAST')
    const audit = await sql('SELECT 1 FROM audit_events WHERE action = $1 AND subject_id = $2', ['training.session', res.body.id])
    expect(audit).toHaveLength(1)
  })
})

describe('enrolment and the waiting list', () => {
  it('fills the places, then the waiting list in order; a withdrawal moves the first waiting member up and e-mails them', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId, capacity: 2 })
    const [a, b, c, d] = await Promise.all([member(), member(), member(), member()])
    expect((await enrol(a!.cookie, sessionId)).body).toEqual({ status: 'enrolled', position: null })
    expect((await enrol(b!.cookie, sessionId)).body).toEqual({ status: 'enrolled', position: null })
    expect((await enrol(c!.cookie, sessionId)).body).toEqual({ status: 'waiting', position: 1 })
    expect((await enrol(d!.cookie, sessionId)).body).toEqual({ status: 'waiting', position: 2 })
    expect((await enrol(d!.cookie, sessionId)).status).toBe(409)

    const w = await withdraw(a!.cookie, sessionId)
    expect(w.status).toBe(200)
    expect(w.body.movedUp).toBe(true)
    const cView = await api<TrainingSessionDetailDto>(`/api/training/sessions/${sessionId}`, { as: c!.cookie })
    expect(cView.body.mine).toEqual({ status: 'enrolled', position: null })
    expect(cView.body.participants).toBeNull() // only instructors see the trainees
    const dView = await api<TrainingSessionDetailDto>(`/api/training/sessions/${sessionId}`, { as: d!.cookie })
    expect(dView.body.mine).toEqual({ status: 'waiting', position: 1 })
    const notices = await sql<{ kind: string, subject: string }>('SELECT kind, subject FROM notices WHERE membership_id = $1', [c!.memberId])
    expect(notices.map(n => n.kind)).toEqual(['training_moved_up'])
    expect(notices[0]!.subject).toMatch(/You have a place: Composite handling and PPE/)
    // A waiting member who withdraws moves nobody up.
    expect((await withdraw(d!.cookie, sessionId)).body.movedUp).toBe(false)
    expect((await withdraw(d!.cookie, sessionId)).status).toBe(404)
  })

  it('a member who opted out of "moved up" e-mails gets the place without one', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId, capacity: 1 })
    const [a, b] = await Promise.all([member(), member({ noticeOptOuts: ['training_moved_up'] })])
    await enrol(a!.cookie, sessionId)
    await enrol(b!.cookie, sessionId)
    await withdraw(a!.cookie, sessionId)
    const view = await api<TrainingSessionDetailDto>(`/api/training/sessions/${sessionId}`, { as: b!.cookie })
    expect(view.body.mine?.status).toBe('enrolled')
    expect(await sql('SELECT 1 FROM notices WHERE membership_id = $1', [b!.memberId])).toEqual([])
  })

  it('holds the capacity under 20 simultaneous enrolments for 5 places: 5 enrolled, 15 waiting, in arrival order', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId, capacity: 5 })
    const members = await Promise.all(Array.from({ length: 20 }, () => member()))
    const answers = await Promise.all(members.map(m => enrol(m.cookie, sessionId)))
    expect(answers.map(a => a.status)).toEqual(Array(20).fill(201))
    expect(answers.filter(a => a.body.status === 'enrolled')).toHaveLength(5)
    expect(answers.filter(a => a.body.status === 'waiting').map(a => a.body.position).sort((x, y) => x! - y!))
      .toEqual(Array.from({ length: 15 }, (_, i) => i + 1))
    const rows = await sql<{ status: string, arrival: string }>(
      'SELECT status, arrival::text FROM training_enrolments WHERE session_id = $1 ORDER BY arrival', [sessionId])
    expect(rows).toHaveLength(20)
    // Arrival order: the first five to take the session's lock hold the places, everyone after waits.
    expect(rows.map(r => r.status)).toEqual([...Array(5).fill('enrolled'), ...Array(15).fill('waiting')])
    // And each waiting member's position is their rank by arrival.
    const byArrival = await sql<{ membership_id: string }>(
      `SELECT membership_id FROM training_enrolments WHERE session_id = $1 AND status = 'waiting' ORDER BY arrival`, [sessionId])
    for (const [i, row] of byArrival.entries()) {
      const idx = members.findIndex(m => m.memberId === row.membership_id)
      expect(answers[idx]!.body.position).toBe(i + 1)
    }
  })

  // The member signs in while active; the status then changes under the session, as it would.
  it.each([
    ['pending', { paidThrough: null }, 'MEMBERSHIP_PENDING'],
    ['lapsed', { paidThrough: clubDay(-60) }, 'MEMBERSHIP_LAPSED'],
    ['suspended', { suspendedAt: ago('1 minute'), suspendedReason: 'Test suspension' }, 'MEMBERSHIP_SUSPENDED'],
    ['resigned', { resignedAt: ago('1 minute') }, 'MEMBERSHIP_RESIGNED'],
  ] as const)('refuses a %s member with the reason', async (_status, state, code) => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId })
    const m = await member()
    await setMembership(m.memberId, state)
    const res = await enrol(m.cookie, sessionId)
    expect(res.status).toBe(422)
    expect(res.body.data?.reasons.map(r => r.code)).toEqual([code])
    expect(await sql('SELECT 1 FROM training_enrolments WHERE membership_id = $1', [m.memberId])).toEqual([])
  })

  it('lets a member in their grace period enrol', async () => {
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId })
    const m = await member({ paidDays: -5 })
    expect((await enrol(m.cookie, sessionId)).body.status).toBe('enrolled')
  })

  it('refuses enrolment once the session has started, and the instructor in their own session', async () => {
    const started = await makeTrainingSession({ instructorId: instructor.memberId, startsAt: ago('1 hour') })
    const m = await member()
    expect((await enrol(m.cookie, started.sessionId)).body.data?.reasons[0]!.code).toBe('SESSION_STARTED')
    const own = await makeTrainingSession({ instructorId: instructor.memberId })
    expect((await enrol(instructor.cookie, own.sessionId)).body.data?.reasons[0]!.code).toBe('OWN_SESSION')
    await makeEnrolment({ sessionId: started.sessionId, memberId: m.memberId })
    expect((await withdraw(m.cookie, started.sessionId)).status).toBe(422)
  })
})
