import sharp from 'sharp'
import { describe, it, expect, beforeAll } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeTier } from '../../support/factories'
import { tierExpiresOn } from '../../../shared/utils/tier-rules'
import type { MemberTiersDto, TierSignoffDto, TierTableDto } from '../../../shared/types/tiers'
import { codes, logFills, person, tierClub, tierPost, trained, type TierClub } from './support'

let c: TierClub
beforeAll(async () => {
  c = await tierClub()
})

const tiersOf = async (memberId: string, as = c.safety.cookie) => (await api<MemberTiersDto>(`/api/members/${memberId}/tiers`, { as })).body

describe('granting a tier', () => {
  it('refuses with 422 and the FULL list of what is missing, and writes nothing', async () => {
    const m = await person(c.clubId)
    const res = await tierPost(c.instructor, m.memberId, '', { rank: 2 })
    expect(res.status).toBe(422)
    expect(codes(res.body)).toEqual(['COURSE_NOT_CURRENT', 'TIER_BELOW_NOT_HELD', 'LOGGED_FILLS_SHORT', 'SUPERVISED_FILLS_SHORT'])
    expect(res.body.data.reasons[0].message).toMatch(/Rig operator|rig_operator/i)
    expect(await sql('SELECT id FROM member_tiers WHERE membership_id = $1', [m.memberId])).toEqual([])
  })

  it('grants once every prerequisite is met: the sign-off, the held tier, the audit, and the next tier\'s gaps', async () => {
    const m = await person(c.clubId)
    await trained(m, 'pressure_safety', c.instructor.memberId)
    await logFills(c, m, 3, { supervisorId: c.instructor.memberId })
    const res = await tierPost(c.instructor, m.memberId, '', { rank: 1, notes: 'Three clean supervised fills' })
    expect(res.status).toBe(201)
    const signoff = res.body as TierSignoffDto
    expect(signoff).toMatchObject({ rank: 1, kind: 'grant', signedOn: clubDay(0), expiresOn: tierExpiresOn(clubDay(0), 24), assessor: { id: c.instructor.memberId } })
    const tiers = await tiersOf(m.memberId)
    expect(tiers.validRank).toBe(1)
    expect(tiers.held).toMatchObject([{ rank: 1, state: 'valid', fillCapBar: 6, firstGrantedOn: clubDay(0), signoffs: [{ id: signoff.id }] }])
    expect(tiers.next?.rank).toBe(2)
    expect(tiers.next?.gaps.map(g => g.code)).toEqual(['COURSE_NOT_CURRENT', 'TIER_BELOW_NOT_HELD', 'LOGGED_FILLS_SHORT', 'SUPERVISED_FILLS_SHORT'])
    const [audit] = await sql<{ action: string, after: { rank: number } }>(`SELECT action, after FROM audit_events WHERE subject_id = $1 AND action = 'tier.grant'`, [m.memberId])
    expect(audit).toMatchObject({ action: 'tier.grant', after: { rank: 1, signoffId: signoff.id } })
    // A valid tier is renewed, not granted again.
    expect(codes((await tierPost(c.instructor, m.memberId, '', { rank: 1 })).body)).toEqual(['TIER_ALREADY_HELD'])
    // The member sees their own tiers; another member may not.
    expect((await api(`/api/members/${m.memberId}/tiers`, { as: m.cookie })).status).toBe(200)
    const other = await person(c.clubId)
    expect((await api(`/api/members/${m.memberId}/tiers`, { as: other.cookie })).status).toBe(403)
  })

  it('keeps evidence privately: the assessor uploads it, the member and officers read it, nobody else', async () => {
    const m = await person(c.clubId)
    await trained(m, 'safety_briefing', c.instructor.memberId)
    const grant = await tierPost(c.instructor, m.memberId, '', { rank: 0 })
    expect(grant.status).toBe(201)
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#336699' } }).png().toBuffer()
    const form = new FormData()
    form.append('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'card.png')
    const up = await api(`/api/tiers/signoffs/${grant.body.id}/evidence`, { method: 'POST', as: c.instructor.cookie, body: form })
    expect(up.status).toBe(201)
    expect((await tiersOf(m.memberId)).held[0]!.signoffs[0]!.evidence).toEqual([{ id: up.body.id, contentType: 'image/png' }])
    expect((await api(`/api/tiers/evidence/${up.body.id}`, { as: m.cookie })).status).toBe(200)
    expect((await api(`/api/tiers/evidence/${up.body.id}`, { as: c.safety.cookie })).status).toBe(200)
    expect((await api(`/api/tiers/evidence/${up.body.id}`, { as: (await person(c.clubId)).cookie })).status).toBe(404)
  })
})

describe('who may sign off', () => {
  it('T0 needs an instructor holding T1 or higher', async () => {
    const m = await person(c.clubId)
    await trained(m, 'safety_briefing', c.instructor.memberId)
    const untiered = await person(c.clubId, ['instructor'])
    expect(codes((await tierPost(untiered, m.memberId, '', { rank: 0 })).body)).toEqual(['ASSESSOR_NOT_QUALIFIED'])
    await makeTier({ memberId: untiered.memberId, rank: 1 })
    expect((await tierPost(untiered, m.memberId, '', { rank: 0 })).status).toBe(201)
  })

  it('T1–T3 need a valid tier above the one granted; a suspended one does not count', async () => {
    const m = await person(c.clubId)
    const t2 = await person(c.clubId, ['instructor'])
    await makeTier({ memberId: t2.memberId, rank: 2 })
    await makeTier({ memberId: t2.memberId, rank: 3, suspended: true })
    expect(codes((await tierPost(t2, m.memberId, '', { rank: 2 })).body)).toEqual(['ASSESSOR_NOT_QUALIFIED'])
    // The T3 instructor passes the assessor check: what remains are the member's gaps.
    expect(codes((await tierPost(c.instructor, m.memberId, '', { rank: 2 })).body)).not.toContain('ASSESSOR_NOT_QUALIFIED')
  })

  it('T4 only by a safety officer holding T4; never oneself; a member without the capability gets 403', async () => {
    const m = await person(c.clubId)
    const t4instructor = await person(c.clubId, ['instructor'])
    await makeTier({ memberId: t4instructor.memberId, rank: 4 })
    expect(codes((await tierPost(t4instructor, m.memberId, '', { rank: 4 })).body)).toEqual(['ASSESSOR_NOT_QUALIFIED'])
    expect(codes((await tierPost(c.safety, m.memberId, '', { rank: 4 })).body)).not.toContain('ASSESSOR_NOT_QUALIFIED')
    expect(codes((await tierPost(c.safety, c.safety.memberId, '', { rank: 3 })).body)).toEqual(['SELF_SIGN_OFF'])
    expect((await tierPost(m, m.memberId, '', { rank: 0 })).status).toBe(403)
  })
})

describe('juniors', () => {
  it('hold at most the junior cap (ABOVE_JUNIOR_CAP)', async () => {
    const junior = await person(c.clubId, [], { birthDate: clubDay(-15 * 365) })
    await makeTier({ memberId: junior.memberId, rank: 1, signedOn: clubDay(-200) })
    await trained(junior, 'rig_operator', c.instructor.memberId)
    await logFills(c, junior, 10, { supervisorId: c.instructor.memberId })
    expect(codes((await tierPost(c.instructor, junior.memberId, '', { rank: 2 })).body)).toEqual(['ABOVE_JUNIOR_CAP'])
  })

  it('a member with no birth date counts as a junior: T0 is granted, T2 refused and the birth date asked for', async () => {
    const m = await person(c.clubId, [], { birthDate: null })
    await trained(m, 'safety_briefing', c.instructor.memberId)
    expect((await tierPost(c.instructor, m.memberId, '', { rank: 0 })).status).toBe(201)
    const tiers = await tiersOf(m.memberId)
    expect(tiers).toMatchObject({ junior: true, birthDateMissing: true, validRank: 0 })
    const t2 = await tierPost(c.instructor, m.memberId, '', { rank: 2 })
    expect(codes(t2.body)).toEqual(expect.arrayContaining(['BIRTH_DATE_MISSING', 'ABOVE_JUNIOR_CAP']))
    const standing = await api('/api/me/standing', { as: m.cookie })
    expect(standing.body.attention.map((a: { code: string }) => a.code)).toContain('BIRTH_DATE_MISSING')
    expect(standing.body.tiers).toMatchObject({ birthDateMissing: true, validRank: 0 })
  })
})

describe('renewal', () => {
  it('needs the minimum fills within the current validity; the validity restarts today', async () => {
    const m = await person(c.clubId)
    await makeTier({ memberId: m.memberId, rank: 1, signedOn: clubDay(-100) })
    await logFills(c, m, 3)
    const short = await tierPost(c.instructor, m.memberId, '/1/renewal', {})
    expect(short.status).toBe(422)
    expect(codes(short.body)).toEqual(['LOGGED_FILLS_SHORT'])
    await logFills(c, m, 1)
    const res = await tierPost(c.instructor, m.memberId, '/1/renewal', { notes: 'Four fills this season' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ kind: 'renewal', signedOn: clubDay(0), expiresOn: tierExpiresOn(clubDay(0), 24) })
    expect((await tiersOf(m.memberId)).held[0]).toMatchObject({ rank: 1, signedOn: clubDay(0), firstGrantedOn: clubDay(-100) })
    // The renewing assessor is qualified as for a grant; nobody renews their own.
    const untiered = await person(c.clubId, ['instructor'])
    expect(codes((await tierPost(untiered, m.memberId, '/1/renewal', {})).body)).toEqual(['ASSESSOR_NOT_QUALIFIED'])
    expect((await tierPost(c.instructor, m.memberId, '/2/renewal', {})).status).toBe(404)
  })
})

describe('suspend, reinstate and revoke', () => {
  it('fall back to the highest tier still valid, e-mail the member and are audited; only the safety officer', async () => {
    const m = await person(c.clubId)
    await makeTier({ memberId: m.memberId, rank: 1, signedOn: clubDay(-300) })
    await makeTier({ memberId: m.memberId, rank: 2, signedOn: clubDay(-100) })
    expect((await tierPost(c.instructor, m.memberId, '/2/suspend', { reason: 'Not mine to do' })).status).toBe(403)
    const suspended = await tierPost(c.safety, m.memberId, '/2/suspend', { reason: 'Filled without eye protection' })
    expect(suspended.status).toBe(200)
    expect(suspended.body).toMatchObject({ validRank: 1 })
    expect(suspended.body.held.find((t: { rank: number }) => t.rank === 2)).toMatchObject({ state: 'suspended', suspensionReason: 'Filled without eye protection' })
    expect(codes((await tierPost(c.safety, m.memberId, '/2/suspend', { reason: 'Again' })).body)).toEqual(['TIER_ALREADY_SUSPENDED'])
    const reinstated = await tierPost(c.safety, m.memberId, '/2/reinstate', { reason: 'Briefed again' })
    expect(reinstated.body).toMatchObject({ validRank: 2 })
    const revoked = await tierPost(c.safety, m.memberId, '/2/revoke', { reason: 'Repeated unsafe fills' })
    expect(revoked.body).toMatchObject({ validRank: 1 })
    expect(codes((await tierPost(c.safety, m.memberId, '/2/reinstate', { reason: 'No' })).body)).toEqual(['TIER_REVOKED'])
    const notices = await sql<{ kind: string }>('SELECT kind FROM notices WHERE membership_id = $1 ORDER BY created_at', [m.memberId])
    expect(notices.map(n => n.kind)).toEqual(['tier_suspended', 'tier_reinstated'])
    const audit = await sql<{ action: string, reason: string }>(`SELECT action, reason FROM audit_events WHERE subject_id = $1 AND action LIKE 'tier.%' ORDER BY created_at`, [m.memberId])
    expect(audit.map(a => a.action)).toEqual(['tier.suspend', 'tier.reinstate', 'tier.revoke'])
  })

  it('a re-grant after revocation starts the tier afresh', async () => {
    const m = await person(c.clubId)
    await makeTier({ memberId: m.memberId, rank: 0, signedOn: clubDay(-200), revoked: true })
    await trained(m, 'safety_briefing', c.instructor.memberId)
    expect((await tierPost(c.instructor, m.memberId, '', { rank: 0 })).status).toBe(201)
    expect((await tiersOf(m.memberId)).held[0]).toMatchObject({ rank: 0, state: 'valid', firstGrantedOn: clubDay(0), revocationReason: null })
  })
})

describe('the tier table', () => {
  it('every member reads it; the safety officer edits it, audited; caps that do not rise are refused', async () => {
    const m = await person(c.clubId)
    const table = (await api<TierTableDto>('/api/tiers', { as: m.cookie })).body
    expect(table.levels.map(l => [l.rank, l.fillCapBar])).toEqual([[0, 0], [1, 6], [2, 10], [3, 17], [4, 25]])
    expect((await api('/api/tiers', { method: 'PUT', as: c.instructor.cookie, body: table })).status).toBe(403)
    const falling = { ...table, levels: table.levels.map(l => (l.rank === 3 ? { ...l, fillCapBar: 9 } : l)) }
    const refused = await api('/api/tiers', { method: 'PUT', as: c.safety.cookie, body: falling })
    expect(refused.status).toBe(400)
    expect(JSON.stringify(refused.body)).toMatch(/Fill caps must rise with each tier: T3 \(9 bar\) is not above T2/)
    const edited = { juniorCapRank: 0, levels: table.levels.map(l => (l.rank === 1 ? { ...l, name: 'Bottle rocket', fillCapBar: 5 } : l)) }
    const saved = await api<TierTableDto>('/api/tiers', { method: 'PUT', as: c.safety.cookie, body: edited })
    expect(saved.status).toBe(200)
    expect(saved.body.juniorCapRank).toBe(0)
    expect(saved.body.levels[1]).toMatchObject({ name: 'Bottle rocket', fillCapBar: 5 })
    const [audit] = await sql<{ before: TierTableDto, after: TierTableDto }>(`SELECT before, after FROM audit_events WHERE club_id = $1 AND action = 'policy.tiers'`, [c.clubId])
    expect(audit!.before.levels[1]!.fillCapBar).toBe(6)
    expect(audit!.after.levels[1]!.fillCapBar).toBe(5)
    expect((await api('/api/tiers', { method: 'PUT', as: c.safety.cookie, body: { juniorCapRank: table.juniorCapRank, levels: table.levels } })).status).toBe(200)
  })

  it('names the club\'s courses, and refuses a course code the club does not have (422, nothing saved)', async () => {
    const table = (await api<TierTableDto>('/api/tiers', { as: c.safety.cookie })).body
    expect(table.courses).toContainEqual({ code: 'pressure_safety', name: 'Pressure safety and fill procedure' })
    const levels = table.levels.map(l => (l.rank === 2 ? { ...l, requiredCourseCodes: ['rig_operator', 'underwater_welding'] } : l))
    const refused = await api<{ data: { reasons: { code: string, message: string }[] } }>('/api/tiers', { method: 'PUT', as: c.safety.cookie, body: { juniorCapRank: table.juniorCapRank, levels } })
    expect(refused.status).toBe(422)
    expect(refused.body.data.reasons[0]).toMatchObject({ code: 'UNKNOWN_COURSE', message: expect.stringContaining('underwater_welding') })
    const after = (await api<TierTableDto>('/api/tiers', { as: c.safety.cookie })).body
    expect(after.levels[2]!.requiredCourseCodes).toEqual(table.levels[2]!.requiredCourseCodes)
  })
})

describe('tier notices', () => {
  it('queue the tightest expiry warning reached (60, 30, 7 days) once per tier, with no opt-out', async () => {
    const m = await person(c.clubId)
    await makeTier({ memberId: m.memberId, rank: 1, signedOn: clubDay(-400), expiresOn: clubDay(20) })
    const run = () => api('/api/outbox/run', { method: 'POST', as: c.admin.cookie })
    expect((await run()).status).toBe(200)
    await run()
    const rows = await sql<{ kind: string, due_on: string, subject: string }>('SELECT kind, due_on::text, subject FROM notices WHERE membership_id = $1', [m.memberId])
    expect(rows.map(r => [r.kind, r.due_on])).toEqual([['tier_expiring', clubDay(-10)]])
    expect(rows[0]!.subject).toMatch(/^Your pressure tier T1 \(Bottle\) expires on/)
  })
})
