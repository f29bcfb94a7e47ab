import { beforeAll, describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { fromNow, makeClub, makeMember, makeNotice, type MadeMember } from '../../support/factories'
import { sql } from '../../support/db'
import type { DashboardDto } from '../../../shared/types/dto'
import type { DemoRole } from '../../support/test-env'

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

const keysOf = (d: DashboardDto) => d.cards.map(c => c.key)
const MINE = ['my-status', 'my-waiver', 'my-paid-through']
const STATUS_CARDS = ['members-pending', 'members-active', 'members-grace', 'members-lapsed', 'members-suspended', 'members-resigned']

describe('GET /api/dashboard for each demo role', () => {
  it('answers 401 when not signed in', async () => {
    expect((await api('/api/dashboard')).status).toBe(401)
  })

  it.each<[DemoRole, string[], string[]]>([
    ['member', MINE, [...STATUS_CARDS, 'pending-approvals', 'notices-failed', 'waiver-missing', 'audit-week']],
    ['instructor', [...MINE, ...STATUS_CARDS], ['pending-approvals', 'notices-queued', 'waiver-missing', 'audit-week']],
    ['safety', [...MINE, ...STATUS_CARDS, 'waiver-version', 'waiver-missing', 'audit-week'], ['pending-approvals', 'notices-queued', 'notices-failed']],
    ['admin', [...MINE, ...STATUS_CARDS, 'pending-approvals', 'notices-queued', 'notices-failed', 'audit-week'], ['waiver-version', 'waiver-missing']],
  ])('gives the %s their cards and no others', async (role, present, absent) => {
    const res = await api<DashboardDto>('/api/dashboard', { as: role })
    expect(res.status).toBe(200)
    const keys = keysOf(res.body)
    for (const key of present) expect(keys).toContain(key)
    for (const key of absent) expect(keys).not.toContain(key)
    if (role === 'member') expect(keys).toEqual(MINE)
    for (const card of res.body.cards) {
      expect(card.to).toMatch(/^\/[a-z]*/)
      expect(card.hint).toBeTruthy()
    }
  })

  it('shows the member their own status, waiver and paid-through date', async () => {
    const res = await api<DashboardDto>('/api/dashboard', { as: 'member' })
    const card = (key: string) => res.body.cards.find(c => c.key === key)!
    expect(card('my-status')).toMatchObject({ value: 'Active', to: '/standing', tone: 'ok' })
    expect(card('my-paid-through').value).toMatch(/^\d{4}-\d{2}-\d{2}$/)
    expect(card('my-waiver').to).toBe('/waiver')
  })
})

describe('club-wide counts come from the member\'s own club only', () => {
  let admin: string
  let safety: string
  let clubId: string

  beforeAll(async () => {
    const club = await makeClub()
    clubId = club.id
    const make = (o: Parameters<typeof makeMember>[0]) => makeMember({ clubId, ...o })
    const [a, s] = await Promise.all([make({ roles: ['admin'] }), make({ roles: ['instructor', 'safety_officer'] })])
    await Promise.all([
      make({ paidDays: 0 }), // active (last paid day)
      make({ paidDays: -1 }), make({ paidDays: -30 }), // grace
      make({ paidDays: -31 }), // lapsed
      make({ paidDays: null, approved: false }), make({ paidDays: null, approved: false }), // pending, awaiting approval
      make({ paidDays: null }), // pending, approved
      make({ suspendedReason: 'Test suspension' }),
      make({ resigned: true, paidDays: -100 }),
    ])
    ;[admin, safety] = await Promise.all([signInAs(a), signInAs(s)])
    // Queued far ahead, so no queue run sends them while the test looks; 'failed' is never picked up.
    await Promise.all((['queued', 'failed', 'failed', 'sent'] as const).map((status, n) => makeNotice({
      memberId: a.memberId, kind: 'test_kind', subjectKey: String(n), status, nextAttemptAt: fromNow('1 day'),
    })))
  })

  it('counts members by status with the same rules as the status function', async () => {
    const res = await api<DashboardDto>('/api/dashboard', { as: admin })
    expect(res.status).toBe(200)
    const counts = Object.fromEntries(res.body.cards.filter(c => c.group === 'members').map(c => [c.key, c.value]))
    // active: the admin, the safety officer and the one paid through today.
    expect(counts).toEqual({
      'members-pending': 3,
      'members-active': 3,
      'members-grace': 2,
      'members-lapsed': 1,
      'members-suspended': 1,
      'members-resigned': 1,
    })
    expect(res.body.cards.find(c => c.key === 'members-grace')?.to).toBe('/members?status=grace')
  })

  it('gives the admin the sign-ups awaiting approval and the notice counts', async () => {
    const res = await api<DashboardDto>('/api/dashboard', { as: admin })
    const card = (key: string) => res.body.cards.find(c => c.key === key)
    expect(card('pending-approvals')).toMatchObject({ value: 2, tone: 'attention', to: '/members?status=pending' })
    // A reminder scan elsewhere could queue more for this club's members: compare with the table itself.
    const [queued] = await sql<{ n: number }>(`SELECT count(*)::int AS n FROM notices WHERE club_id = $1 AND status IN ('queued', 'sending')`, [clubId])
    expect(queued!.n).toBeGreaterThanOrEqual(1)
    expect(card('notices-queued')?.value).toBe(queued!.n)
    expect(card('notices-failed')).toMatchObject({ value: 2, tone: 'attention', to: '/outbox?status=failed' })
  })

  it('counts this week\'s audit events of the club', async () => {
    const before = (await api<DashboardDto>('/api/dashboard', { as: safety })).body.cards.find(c => c.key === 'audit-week')?.value
    expect(before).toBe(0)
    await api('/api/waivers', { body: { title: 'Dashboard test waiver', body: 'Proof tests are done full of water, from a distance.' }, as: safety })
    const after = (await api<DashboardDto>('/api/dashboard', { as: safety })).body.cards.find(c => c.key === 'audit-week')?.value
    expect(after).toBe(1)
  })
})
