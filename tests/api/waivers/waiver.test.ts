import { beforeAll, describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { makeClub, makeMember, type MadeMember } from '../../support/factories'
import { sql } from '../../support/db'
import type { CurrentWaiverDto, WaiverAcceptedDto, WaiverDto, WaiverVersionDto } from '../../../shared/types/waivers'
import type { DashboardDto } from '../../../shared/types/dashboard'
import type { StandingDto } from '../../../shared/types/members'

// A new waiver version asks every member of the club again. So that no other test file sees the
// demo club's waiver change under it, these tests publish in a club of their own; the demo
// accounts are used only where nothing is written (403s, reads).

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

const text = (n: number) => ({ title: `Test club waiver, revision ${n}`, body: `Revision ${n}. Proof tests are done full of water and from a distance; nobody stands over a pressurised vessel.` })

let club: { id: string, name: string }
const as: Record<'safety' | 'admin' | 'member' | 'other', string> = { safety: '', admin: '', member: '', other: '' }
let member: MadeMember

beforeAll(async () => {
  club = await makeClub()
  const safety = await makeMember({ clubId: club.id, roles: ['instructor', 'safety_officer'], name: 'Sabine Testwarden' })
  const admin = await makeMember({ clubId: club.id, roles: ['admin'] })
  member = await makeMember({ clubId: club.id, name: 'Wren Cordgrass' })
  const other = await makeMember({ clubId: club.id })
  const [s, a, m, o] = await Promise.all([safety, admin, member, other].map(signInAs))
  Object.assign(as, { safety: s, admin: a, member: m, other: o })
})

async function publish(n: number, who = as.safety) {
  return api<WaiverDto>('/api/waivers', { body: text(n), as: who })
}

async function current(who: string) {
  const res = await api<CurrentWaiverDto>('/api/waivers/current', { as: who })
  expect(res.status).toBe(200)
  return res.body
}

describe('the waiver life cycle in one club', () => {
  it('has nothing to accept before the first version: current is null, accepting is refused', async () => {
    const before = await current(as.member)
    expect(before).toEqual({ waiver: null, standing: { currentVersion: null, acceptedVersion: null, acceptedAt: null, current: true } })
    const res = await api('/api/waivers/accept', { body: { version: 1, typedName: member.name }, as: as.member })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['NO_WAIVER'])
  })

  it('publishes a new version for the safety officer, audits it, and asks everyone again', async () => {
    const first = await publish(1)
    expect(first.status).toBe(201)
    const v1 = first.body.version
    expect(first.body).toMatchObject({ ...text(1), publishedByName: 'Sabine Testwarden' })

    // The member accepts v1 …
    const accepted = await api<WaiverAcceptedDto>('/api/waivers/accept', { body: { version: v1, typedName: member.name }, as: as.member })
    expect(accepted.status).toBe(200)
    expect(accepted.body).toMatchObject({ alreadyAccepted: false, standing: { currentVersion: v1, acceptedVersion: v1, current: true } })

    // … then a new version is published: it is the old one + 1, and the member is no longer current.
    const second = await publish(2)
    expect(second.status).toBe(201)
    const v2 = second.body.version
    expect(v2).toBe(v1 + 1)
    const after = await current(as.member)
    expect(after.waiver).toMatchObject({ id: second.body.id, version: v2, ...text(2) })
    expect(after.standing).toMatchObject({ currentVersion: v2, acceptedVersion: v1, current: false })
    const standing = await api<StandingDto>('/api/me/standing', { as: as.member })
    expect(standing.body.member.waiver.current).toBe(false)
    expect(standing.body.attention.map(a => a.code)).toContain('WAIVER_NOT_ACCEPTED')

    // Nothing was edited: the first version is still there word for word.
    const [old] = await sql<{ title: string, body: string }>(`SELECT title, body FROM waivers WHERE id = $1`, [first.body.id])
    expect(old).toEqual(text(1))

    // Each publication is in the audit trail, with the officer as the actor (kept by id; the name is theirs now).
    const events = await sql<{ action: string, actor_name: string, subject_id: string, before: unknown, after: { version: number } }>(
      `SELECT a.action, u.name AS actor_name, a.subject_id, a.before, a.after FROM audit_events a
       JOIN memberships m ON m.id = a.actor_membership_id JOIN users u ON u.id = m.user_id
       WHERE a.club_id = $1 AND a.action = 'waiver.publish' ORDER BY a.created_at`, [club.id])
    expect(events).toEqual([
      { action: 'waiver.publish', actor_name: 'Sabine Testwarden', subject_id: first.body.id, before: null, after: { version: v1, title: text(1).title } },
      { action: 'waiver.publish', actor_name: 'Sabine Testwarden', subject_id: second.body.id, before: { version: v1 }, after: { version: v2, title: text(2).title } },
    ])
  })

  it('refuses an outdated version and a name that is not the member\'s, with 422 and their codes', async () => {
    const { waiver } = await current(as.member)
    const v = waiver!.version
    const outdated = await api('/api/waivers/accept', { body: { version: v - 1, typedName: member.name }, as: as.member })
    expect(outdated.status).toBe(422)
    expect(outdated.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['WAIVER_OUTDATED'])

    const future = await api('/api/waivers/accept', { body: { version: v + 5, typedName: member.name }, as: as.member })
    expect(future.status).toBe(422)
    expect(future.body.data.reasons[0].code).toBe('WAIVER_OUTDATED')

    const wrongName = await api('/api/waivers/accept', { body: { version: v, typedName: 'Somebody Else' }, as: as.member })
    expect(wrongName.status).toBe(422)
    expect(wrongName.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['NAME_MISMATCH'])

    const both = await api('/api/waivers/accept', { body: { version: v - 1, typedName: 'Somebody Else' }, as: as.member })
    expect(both.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['WAIVER_OUTDATED', 'NAME_MISMATCH'])

    expect(await sql(`SELECT 1 FROM waiver_acceptances WHERE membership_id = $1 AND waiver_id = $2`, [member.memberId, waiver!.id])).toEqual([])
    expect((await current(as.member)).standing.current).toBe(false)
  })

  it('accepts the current version with the name typed in any case and spacing, records it, and is idempotent', async () => {
    const { waiver } = await current(as.member)
    const typed = `  ${member.name.toUpperCase().replace(' ', '   ')} `
    const res = await api<WaiverAcceptedDto>('/api/waivers/accept', { body: { version: waiver!.version, typedName: typed }, as: as.member })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ alreadyAccepted: false, standing: { currentVersion: waiver!.version, acceptedVersion: waiver!.version, current: true } })

    const [row] = await sql<{ typed_name: string, accepted_at: Date }>(
      `SELECT typed_name, accepted_at FROM waiver_acceptances WHERE membership_id = $1 AND waiver_id = $2`, [member.memberId, waiver!.id])
    expect(row!.typed_name).toBe(typed.trim())
    expect(Math.abs(new Date(row!.accepted_at).getTime() - Date.now())).toBeLessThan(60_000)

    const again = await api<WaiverAcceptedDto>('/api/waivers/accept', { body: { version: waiver!.version, typedName: member.name }, as: as.member })
    expect(again.status).toBe(200)
    expect(again.body.alreadyAccepted).toBe(true)
    const rows = await sql<{ typed_name: string }>(`SELECT typed_name FROM waiver_acceptances WHERE membership_id = $1 AND waiver_id = $2`, [member.memberId, waiver!.id])
    expect(rows).toEqual([{ typed_name: typed.trim() }])

    const standing = await api<StandingDto>('/api/me/standing', { as: as.member })
    expect(standing.body.member.waiver.current).toBe(true)
    expect(standing.body.attention.map(a => a.code)).not.toContain('WAIVER_NOT_ACCEPTED')
  })

  it('shows the officer the history with acceptance counts, newest first', async () => {
    const res = await api<WaiverVersionDto[]>('/api/waivers', { as: as.safety })
    expect(res.status).toBe(200)
    expect(res.body.map(v => v.title)).toEqual([text(2).title, text(1).title])
    expect(res.body.map(v => v.acceptances)).toEqual([1, 1])
    expect(res.body[0]!.version).toBe(res.body[1]!.version + 1)
  })

  it('counts members without the current waiver on the officer\'s dashboard', async () => {
    const res = await api<DashboardDto>('/api/dashboard', { as: as.safety })
    const { waiver } = await current(as.safety)
    const card = (key: string) => res.body.cards.find(c => c.key === key)
    expect(card('waiver-version')?.value).toBe(`Version ${waiver!.version}`)
    // Four members in this club; only `member` accepted the version in force.
    expect(card('waiver-missing')?.value).toBe(3)
  })

  it('answers 409 when two versions are published at the same moment, and one of them wins', async () => {
    const results = await Promise.all([publish(3), publish(4), publish(5)])
    const statuses = results.map(r => r.status).sort()
    expect(statuses).toContain(201)
    for (const s of statuses) expect([201, 409]).toContain(s)
    const versions = await sql<{ version: number }>(`SELECT version FROM waivers WHERE club_id = $1 ORDER BY version`, [club.id])
    expect(new Set(versions.map(v => v.version)).size).toBe(versions.length)
    expect(versions.length).toBe(2 + statuses.filter(s => s === 201).length)
  })
})

describe('who may publish and read the history', () => {
  it.each([
    ['the club\'s admin', () => as.admin],
    ['a plain member', () => as.member],
  ])('refuses publishing to %s with 403 and writes nothing', async (_label, who) => {
    const before = await sql(`SELECT id FROM waivers WHERE club_id = $1`, [club.id])
    const res = await publish(99, who())
    expect(res.status).toBe(403)
    expect(await sql(`SELECT id FROM waivers WHERE club_id = $1`, [club.id])).toEqual(before)
  })

  it.each(['admin', 'member', 'instructor'])('refuses the demo %s with 403 (the demo club\'s waiver is not touched)', async (role) => {
    expect((await api('/api/waivers', { body: text(9), as: role })).status).toBe(403)
    expect((await api('/api/waivers', { as: role })).status).toBe(403)
  })

  it('answers 401 to anonymous callers on every waiver route', async () => {
    expect((await api('/api/waivers/current')).status).toBe(401)
    expect((await api('/api/waivers')).status).toBe(401)
    expect((await api('/api/waivers', { body: text(9) })).status).toBe(401)
    expect((await api('/api/waivers/accept', { body: { version: 1, typedName: 'x' } })).status).toBe(401)
  })

  it('refuses a publication that is too short with 400 and field messages', async () => {
    const res = await api('/api/waivers', { body: { title: '', body: 'short' }, as: as.safety })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields).sort()).toEqual(['body', 'title'])
  })

  it('refuses a malformed acceptance with 400', async () => {
    const res = await api('/api/waivers/accept', { body: { version: 'latest', typedName: '' }, as: as.member })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields).sort()).toEqual(['typedName', 'version'])
  })

  it('keeps each club\'s waiver to itself: the demo club\'s version is not this club\'s', async () => {
    const demo = await current('member')
    const mine = await current(as.member)
    expect(demo.waiver?.id).not.toBe(mine.waiver?.id)
    expect(demo.waiver?.title).not.toMatch(/^Test club waiver/)
  })
})
