import { describe, it, expect, beforeAll } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeStation, makeTier, makeTrainingRecord } from '../../support/factories'
import type { UnconfirmedRecordDto, UnconfirmedTierDto } from '../../../shared/types/imported'
import type { MemberTiersDto } from '../../../shared/types/tiers'
import { check, codesOf, fillBody, fillClub, filler, type FillClub } from '../fills/fill-support'
import { codes, person, tierClub, tierPost, type TierClub } from './support'

// Training records and tiers a roster import brings in are unconfirmed: the fill gate, bookings and
// the tier rules answer as if they were not there, until an instructor (records) or a qualified
// assessor (tiers) confirms each; then they count like any other.

const confirm = (as: string, kind: 'training' | 'tiers', id: string) =>
  api(`/api/${kind}/imported/${id}/confirm`, { as, body: { confirm: true } })
const reject = (as: string, kind: 'training' | 'tiers', id: string, reason: string) =>
  api(`/api/${kind}/imported/${id}/reject`, { as, body: { reason } })

describe('the fill gate and bookings ignore unconfirmed imported records', () => {
  let club: FillClub
  beforeAll(async () => {
    club = await fillClub()
  })

  it('an unconfirmed T2 changes no answer of /api/fills/check; confirmed, it allows the fill', async () => {
    const m = await filler(club, { rank: null })
    const before = await check(m.cookie, fillBody(club, m))
    expect(codesOf(before.body)).toContain('NO_VALID_TIER')
    const { memberTierId } = await makeTier({ memberId: m.memberId, rank: 2, imported: true })
    const unconfirmed = await check(m.cookie, fillBody(club, m))
    expect(unconfirmed.body).toEqual(before.body)

    const listed = await api<UnconfirmedTierDto[]>('/api/tiers/imported', { as: club.instructor.cookie })
    expect(listed.status, JSON.stringify(listed.body)).toBe(200)
    expect(listed.body.find(t => t.id === memberTierId)).toMatchObject({ membershipId: m.memberId, rank: 2, code: 'T2', problem: null })
    const done = await confirm(club.instructor.cookie, 'tiers', memberTierId)
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    const after = await check(m.cookie, fillBody(club, m))
    expect(after.body).toMatchObject({ allowed: true, reasons: [] })
    expect((await api<UnconfirmedTierDto[]>('/api/tiers/imported', { as: club.instructor.cookie })).body.map(t => t.id)).not.toContain(memberTierId)
  })

  it('an unconfirmed course record leaves the course not current for the gate; confirmed, it counts', async () => {
    const m = await filler(club, { courses: ['pressure_safety'] })
    const before = await check(m.cookie, fillBody(club, m))
    expect(codesOf(before.body)).toEqual(['COURSE_NOT_CURRENT'])
    const { recordId } = await makeTrainingRecord({ memberId: m.memberId, course: 'rig_operator', trainerId: club.instructor.memberId, trainedOn: clubDay(-30), imported: true })
    expect((await check(m.cookie, fillBody(club, m))).body).toEqual(before.body)

    const listed = await api<UnconfirmedRecordDto[]>('/api/training/imported', { as: club.instructor.cookie })
    expect(listed.body.find(r => r.id === recordId)).toMatchObject({ membershipId: m.memberId, courseCode: 'rig_operator', trainedTo: clubDay(-30) })
    expect((await confirm(club.instructor.cookie, 'training', recordId)).status).toBe(200)
    expect((await check(m.cookie, fillBody(club, m))).body).toMatchObject({ allowed: true, reasons: [] })
    // Confirmed once: a second confirmation is a conflict.
    expect((await confirm(club.instructor.cookie, 'training', recordId)).status).toBe(409)
  })

  it('an unconfirmed record does not open a station that needs the course; confirmed, it does', async () => {
    const { stationId } = await makeStation({ clubId: club.clubId, requiredCourses: ['composite_ppe'] })
    const m = await filler(club)
    const body = { stationId, startsAt: `${clubDay(3)}T10:00`, endsAt: `${clubDay(3)}T11:00` }
    const { recordId } = await makeTrainingRecord({ memberId: m.memberId, course: 'composite_ppe', trainerId: club.instructor.memberId, imported: true })
    const refused = await api('/api/bookings', { as: m.cookie, body })
    expect(refused.status).toBe(422)
    expect(refused.body.data.reasons.map((r: { code: string, course?: { standing: string } }) => [r.code, r.course?.standing])).toEqual([['COURSE_NOT_CURRENT', 'never_taken']])
    // The member's own course list agrees with the gate.
    const mine = await api<{ code: string, standing: string }[]>('/api/training/courses', { as: m.cookie })
    expect(mine.body.find(c => c.code === 'composite_ppe')!.standing).toBe('never_taken')
    expect((await confirm(club.instructor.cookie, 'training', recordId)).status).toBe(200)
    expect((await api('/api/bookings', { as: m.cookie, body })).status).toBe(201)
  })
})

describe('tier rules and the confirm lists', () => {
  let c: TierClub
  beforeAll(async () => {
    c = await tierClub()
  })

  it('an unconfirmed T1 is no tier below for a grant of T2 (nor does it show as held) until confirmed', async () => {
    const m = await person(c.clubId)
    // Held long enough before the grant, by the import's dates.
    const { memberTierId } = await makeTier({ memberId: m.memberId, rank: 1, firstGrantedOn: clubDay(-400), signedOn: clubDay(-30), imported: true })
    const before = await tierPost(c.instructor, m.memberId, '', { rank: 2 })
    expect(before.status).toBe(422)
    expect(codes(before.body)).toContain('TIER_BELOW_NOT_HELD')
    const standing = (await api<MemberTiersDto>(`/api/members/${m.memberId}/tiers`, { as: c.safety.cookie })).body
    expect(standing).toMatchObject({ validRank: null, held: [] })

    expect((await confirm(c.instructor.cookie, 'tiers', memberTierId)).status).toBe(200)
    const after = await tierPost(c.instructor, m.memberId, '', { rank: 2 })
    expect(codes(after.body)).not.toContain('TIER_BELOW_NOT_HELD')
    expect((await api<MemberTiersDto>(`/api/members/${m.memberId}/tiers`, { as: c.safety.cookie })).body.validRank).toBe(1)
    const [row] = await sql<{ confirmed_by_membership_id: string }>('SELECT confirmed_by_membership_id FROM member_tiers WHERE id = $1', [memberTierId])
    expect(row!.confirmed_by_membership_id).toBe(c.instructor.memberId)
    const [audit] = await sql<{ n: number }>(`SELECT count(*)::int AS n FROM audit_events WHERE action = 'tier.confirm' AND subject_id = $1`, [m.memberId])
    expect(audit!.n).toBe(1)
  })

  it('an unconfirmed tier makes nobody an assessor, and confirming follows the assessor rules', async () => {
    // An instructor whose only T3 is unconfirmed may not sign off a T1.
    const unproven = await person(c.clubId, ['instructor'])
    const { memberTierId: unprovenT3 } = await makeTier({ memberId: unproven.memberId, rank: 3, imported: true })
    const m = await person(c.clubId)
    const grant = await tierPost(unproven, m.memberId, '', { rank: 0 })
    expect(grant.status).toBe(422)
    expect(codes(grant.body)).toEqual(['ASSESSOR_NOT_QUALIFIED'])

    const t3 = await makeTier({ memberId: m.memberId, rank: 3, imported: true })
    const t4 = await makeTier({ memberId: (await person(c.clubId)).memberId, rank: 4, imported: true })
    // The T3 instructor holds no tier above T3; only a safety officer holding T4 confirms a T4.
    const list = (await api<UnconfirmedTierDto[]>('/api/tiers/imported', { as: c.instructor.cookie })).body
    expect(list.find(t => t.id === t3.memberTierId)!.problem).toMatch(/T4 or higher/)
    expect(list.find(t => t.id === t4.memberTierId)!.problem).toMatch(/safety officer/)
    for (const id of [t3.memberTierId, t4.memberTierId]) {
      const res = await confirm(c.instructor.cookie, 'tiers', id)
      expect(res.status).toBe(422)
      expect(codes(res.body)).toEqual(['ASSESSOR_NOT_QUALIFIED'])
    }
    // Nobody confirms their own.
    const own = await confirm(unproven.cookie, 'tiers', unprovenT3)
    expect(own.status).toBe(422)
    expect(codes(own.body)).toEqual(['SELF_SIGN_OFF'])
    expect((await api<UnconfirmedTierDto[]>('/api/tiers/imported', { as: unproven.cookie })).body.find(t => t.id === unprovenT3)!.problem).toMatch(/own/)

    expect((await confirm(c.safety.cookie, 'tiers', t3.memberTierId)).status).toBe(200)
    expect((await confirm(c.safety.cookie, 'tiers', t4.memberTierId)).status).toBe(200)
    // Unknown or another club's: 404; an admin holds no tiers.grant.
    expect((await confirm(c.safety.cookie, 'tiers', c.admin.memberId)).status).toBe(404)
    expect((await confirm(c.admin.cookie, 'tiers', unprovenT3)).status).toBe(403)
  })

  it('a rejected tier or record is deleted with the reason in the audit trail; a confirmed one cannot be rejected', async () => {
    const m = await person(c.clubId)
    const { memberTierId } = await makeTier({ memberId: m.memberId, rank: 1, imported: true })
    const { recordId } = await makeTrainingRecord({ memberId: m.memberId, course: 'pressure_safety', trainerId: c.instructor.memberId, imported: true })
    expect((await reject(c.instructor.cookie, 'tiers', memberTierId, '')).status).toBe(400)
    expect((await reject(c.instructor.cookie, 'tiers', memberTierId, 'No such assessor in the old club records')).status).toBe(200)
    expect((await reject(c.instructor.cookie, 'training', recordId, 'The certificate names somebody else')).status).toBe(200)
    expect(await sql('SELECT id FROM member_tiers WHERE id = $1', [memberTierId])).toEqual([])
    expect(await sql('SELECT id FROM training_records WHERE id = $1', [recordId])).toEqual([])
    const reasons = await sql<{ action: string, reason: string }>(
      `SELECT action, reason FROM audit_events WHERE action IN ('tier.reject', 'training.record_reject') AND (subject_id = $1 OR subject_id = $2) ORDER BY action`,
      [m.memberId, recordId])
    expect(reasons).toEqual([
      { action: 'tier.reject', reason: 'No such assessor in the old club records' },
      { action: 'training.record_reject', reason: 'The certificate names somebody else' },
    ])
    const { recordId: own } = await makeTrainingRecord({ memberId: c.instructor.memberId, course: 'pressure_safety', trainerId: c.safety.memberId, imported: true })
    const self = await confirm(c.instructor.cookie, 'training', own)
    expect(self.status).toBe(422)
    expect(codes(self.body)).toEqual(['SELF_CONFIRM'])
    expect((await confirm(c.safety.cookie, 'training', own)).status).toBe(200)
    expect((await reject(c.safety.cookie, 'training', own, 'Too late')).status).toBe(409)
  })
})
