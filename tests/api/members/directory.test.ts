import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeMember, type MadeMember, type MemberOverrides } from '../../support/factories'
import { MEMBERSHIP_STATUSES, type MembershipStatus } from '../../../shared/utils/membership-status'
import type { MemberListItemDto, Paged } from '../../../shared/types/dto'

type Page = Paged<MemberListItemDto>

/** Every member this file made whose name or e-mail contains `tag`, in one call (all fit one page). */
async function listTagged(tag: string, query: Record<string, string | number> = {}): Promise<Page> {
  const res = await api<Page>('/api/members', { as: 'admin', query: { q: tag, pageSize: 100, ...query } })
  expect(res.status).toBe(200)
  return res.body
}

describe('GET /api/members: paging, sorting, filters and search', () => {
  const tag = `dir${randomUUID().slice(0, 8)}`
  const made: (MadeMember & { paidDays: number | null })[] = []
  // Names sort differently from e-mails and from the order of creation, so each sort shows itself.
  const people: { first: string, mail: string, paidDays: number | null, roles?: ('instructor' | 'admin')[] }[] = [
    { first: 'Delta', mail: 'b', paidDays: 40 },
    { first: 'alpha', mail: 'f', paidDays: -3, roles: ['instructor'] },
    { first: 'Echo', mail: 'a', paidDays: null },
    { first: 'Bravo', mail: 'e', paidDays: 400, roles: ['instructor'] },
    { first: 'charlie', mail: 'c', paidDays: 10 },
    { first: 'Foxtrot', mail: 'd', paidDays: -90 },
    { first: 'Golf', mail: 'g', paidDays: 40 },
  ]

  beforeAll(async () => {
    for (const p of people) {
      const m = await makeMember({
        name: `${p.first} ${tag}`,
        email: `${p.mail}-${tag}@test.hoopwise.example`,
        paidDays: p.paidDays,
        roles: p.roles,
      })
      made.push({ ...m, paidDays: p.paidDays })
    }
  })

  it('pages on the server: total, page sizes and no overlap between pages', async () => {
    const pages = await Promise.all([1, 2, 3].map(page => listTagged(tag, { pageSize: 3, page })))
    expect(pages.map(p => p.total)).toEqual([7, 7, 7])
    expect(pages.map(p => p.items.length)).toEqual([3, 3, 1])
    expect(pages[0]!.page).toBe(1)
    expect(pages[0]!.pageSize).toBe(3)
    const ids = pages.flatMap(p => p.items.map(i => i.id))
    expect(new Set(ids).size).toBe(7)
    expect(new Set(ids)).toEqual(new Set(made.map(m => m.memberId)))
    const beyond = await listTagged(tag, { pageSize: 3, page: 4 })
    expect(beyond).toMatchObject({ total: 7, items: [] })
  })

  it('sorts by name both ways, case-insensitively, and desc is the exact reverse', async () => {
    const asc = (await listTagged(tag, { sort: 'name', dir: 'asc' })).items.map(i => i.name.split(' ')[0])
    expect(asc).toEqual(['alpha', 'Bravo', 'charlie', 'Delta', 'Echo', 'Foxtrot', 'Golf'])
    const desc = (await listTagged(tag, { sort: 'name', dir: 'desc' })).items.map(i => i.name.split(' ')[0])
    expect(desc).toEqual([...asc].reverse())
  })

  it('sorts by e-mail both ways', async () => {
    const asc = (await listTagged(tag, { sort: 'email', dir: 'asc' })).items.map(i => i.email[0])
    expect(asc).toEqual(['a', 'b', 'c', 'd', 'e', 'f', 'g'])
    const desc = (await listTagged(tag, { sort: 'email', dir: 'desc' })).items.map(i => i.email[0])
    expect(desc).toEqual(['g', 'f', 'e', 'd', 'c', 'b', 'a'])
  })

  it('sorts by paid-through both ways with never-paid last and ties broken by id', async () => {
    const asc = (await listTagged(tag, { sort: 'paidThrough', dir: 'asc' })).items
    const desc = (await listTagged(tag, { sort: 'paidThrough', dir: 'desc' })).items
    const dates = (items: MemberListItemDto[]) => items.map(i => i.paidThrough)
    const paid = dates(asc).slice(0, 6) as string[]
    expect(paid).toEqual([...paid].sort())
    expect(dates(asc)[6]).toBeNull()
    expect(dates(desc).slice(0, 6)).toEqual([...paid].reverse())
    expect(dates(desc)[6]).toBeNull()
    // Delta and Golf share a date: their order follows the id, reversed with the direction.
    const tie = (items: MemberListItemDto[]) => items.filter(i => /^(Delta|Golf) /.test(i.name)).map(i => i.id)
    expect(tie(asc)).toEqual([...tie(asc)].sort())
    expect(tie(desc)).toEqual([...tie(asc)].reverse())
  })

  it('sorts by joining order both ways', async () => {
    const asc = (await listTagged(tag, { sort: 'joined' })).items.map(i => i.id)
    expect(asc).toEqual(made.map(m => m.memberId))
    const desc = (await listTagged(tag, { sort: 'joined', dir: 'desc' })).items.map(i => i.id)
    expect(desc).toEqual([...asc].reverse())
  })

  it('filters by role and by status', async () => {
    const instructors = await listTagged(tag, { role: 'instructor' })
    expect(instructors.items.map(i => i.name.split(' ')[0]).sort()).toEqual(['Bravo', 'alpha'])
    expect(instructors.items.every(i => i.roles.includes('instructor'))).toBe(true)
    const grace = await listTagged(tag, { status: 'grace' })
    expect(grace.items.map(i => i.name.split(' ')[0])).toEqual(['alpha'])
    const pending = await listTagged(tag, { status: 'pending', role: 'member' })
    expect(pending.items.map(i => i.name.split(' ')[0])).toEqual(['Echo'])
    const none = await listTagged(tag, { status: 'active', role: 'admin' })
    expect(none).toMatchObject({ total: 0, items: [] })
  })

  it('searches names and e-mails case-insensitively as a substring, wildcards taken literally', async () => {
    expect((await listTagged(tag.toUpperCase())).total).toBe(7)
    const byName = await listTagged(`XTROT ${tag}`)
    expect(byName.items.map(i => i.name)).toEqual([`Foxtrot ${tag}`])
    const byEmail = await listTagged(`e-${tag}@TEST`)
    expect(byEmail.items.map(i => i.email)).toEqual([`e-${tag}@test.hoopwise.example`])
    expect((await listTagged(`${tag}%`)).total).toBe(0)
    expect((await listTagged(`_${tag}`)).total).toBe(0)
  })

  it.each([
    [{ pageSize: 101 }, 'pageSize'],
    [{ pageSize: 0 }, 'pageSize'],
    [{ page: 0 }, 'page'],
    [{ sort: 'age' }, 'sort'],
    [{ dir: 'sideways' }, 'dir'],
    [{ status: 'dormant' }, 'status'],
    [{ role: 'captain' }, 'role'],
    [{ q: 'x'.repeat(101) }, 'q'],
  ])('refuses %o with 400 and a message for the field', async (query, field) => {
    const res = await api('/api/members', { as: 'admin', query })
    expect(res.status).toBe(400)
    expect(res.body.data.fields[field]).toBeTruthy()
  })

  it('is for members.read only: 401 signed out, 403 for a member, 200 for an instructor', async () => {
    expect((await api('/api/members')).status).toBe(401)
    expect((await api('/api/members', { as: 'member' })).status).toBe(403)
    expect((await api('/api/members', { as: 'instructor', query: { q: tag } })).body.total).toBe(7)
  })
})

describe('the status filter\'s SQL puts each member in the status the rules give', () => {
  const tag = `sts${randomUUID().slice(0, 8)}`
  const made: [MadeMember, MembershipStatus][] = []

  beforeAll(async () => {
    const [club] = await sql<{ grace_days: number }>(`SELECT grace_days FROM clubs WHERE tag_prefix = 'SRG'`)
    const graceDays = club!.grace_days
    // Each case with the status worked out by hand from the rules: paid through today or later is
    // active; up to graceDays days after, grace; later, lapsed; never paid, pending; a suspension wins
    // over everything, a resignation over the dues.
    const cases: [MemberOverrides, MembershipStatus][] = [
      [{ paidDays: 300 }, 'active'], [{ paidDays: 1 }, 'active'], [{ paidDays: 0 }, 'active'], // the last one paid through today
      [{ paidDays: -1 }, 'grace'], [{ paidDays: -Math.floor(graceDays / 2) }, 'grace'], [{ paidDays: -graceDays }, 'grace'], // to its last day
      [{ paidDays: -graceDays - 1 }, 'lapsed'], [{ paidDays: -400 }, 'lapsed'], // from the day after grace
      [{ paidDays: null }, 'pending'], [{ paidDays: null, approved: false }, 'pending'],
      [{ paidDays: 100, suspendedReason: 'Test suspension' }, 'suspended'], [{ paidDays: null, suspendedReason: 'Test suspension' }, 'suspended'],
      [{ paidDays: -graceDays - 1, resigned: true, suspendedReason: 'Suspended and resigned' }, 'suspended'], // suspended wins
      [{ paidDays: 100, resigned: true }, 'resigned'], [{ paidDays: -5, resigned: true }, 'resigned'], [{ paidDays: null, resigned: true }, 'resigned'],
    ]
    for (const [i, [c, status]] of cases.entries()) made.push([await makeMember({ ...c, name: `Status ${tag} ${String(i).padStart(2, '0')}` }), status])
  })

  it('puts every member in exactly the status worked out by hand, boundary days included', async () => {
    const expected = new Map(made.map(([m, status]) => [m.memberId, status]))
    const found = new Map<string, MembershipStatus>()
    for (const status of MEMBERSHIP_STATUSES) {
      const page = await listTagged(tag, { status })
      for (const item of page.items) {
        expect(found.has(item.id), `${item.name} in two filters`).toBe(false)
        found.set(item.id, status)
        expect(item.status).toBe(status) // the row's status (derived in TypeScript) agrees with the filter (SQL)
      }
    }
    expect(Object.fromEntries(found)).toEqual(Object.fromEntries(expected))
    // Every status has at least one member here, so each SQL branch was exercised.
    expect(new Set(found.values())).toEqual(new Set(MEMBERSHIP_STATUSES))
    const counts = (s: MembershipStatus) => [...found.values()].filter(v => v === s).length
    expect([counts('active'), counts('grace'), counts('lapsed'), counts('pending'), counts('suspended'), counts('resigned')])
      .toEqual([3, 3, 2, 2, 3, 3])
  })
})

describe('GET /api/members: the name and e-mail orders follow an account that changes', () => {
  it('re-sorts a renamed member and one whose e-mail changed, with no stale sort key left', async () => {
    const tag = `ren${randomUUID().slice(0, 8)}`
    const a = await makeMember({ name: `Aster ${tag}`, email: `a-${tag}@test.hoopwise.example` })
    const b = await makeMember({ name: `Birch ${tag}`, email: `b-${tag}@test.hoopwise.example` })
    const names = async () => (await listTagged(tag, { sort: 'name' })).items.map(i => i.name.split(' ')[0])
    expect(await names()).toEqual(['Aster', 'Birch'])

    const renamed = await api(`/api/members/${a.memberId}`, { as: 'admin', method: 'PATCH', body: { name: `Zinnia ${tag}` } })
    expect(renamed.status).toBe(200)
    expect(await names()).toEqual(['Birch', 'Zinnia'])

    // An e-mail change made below the API (as a confirmed address change would) moves the e-mail order too.
    await sql(`UPDATE users SET email = $2 WHERE id = $1`, [b.userId, `z-${tag}@test.hoopwise.example`])
    const emails = (await listTagged(tag, { sort: 'email' })).items.map(i => i.email[0])
    expect(emails).toEqual(['a', 'z'])
    const [keys] = await sql<{ stale: number }>(`SELECT count(*)::int AS stale FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.name_key <> lower(u.name) OR m.email_key <> lower(u.email)`)
    expect(keys!.stale).toBe(0)
  })

  it('refuses a sort key written by hand: the membership takes it from its account again', async () => {
    const m = await makeMember({ name: `Sorrel ${randomUUID().slice(0, 8)}` })
    await sql(`UPDATE memberships SET name_key = 'aaaa' WHERE id = $1`, [m.memberId])
    const [row] = await sql<{ name_key: string }>(`SELECT name_key FROM memberships WHERE id = $1`, [m.memberId])
    expect(row!.name_key).toBe(m.name.toLowerCase())
  })
})

describe('GET /api/members: a pending row says what it waits for', () => {
  it('carries approvedAt, so the list can tell "awaiting approval" from "approved, first dues unpaid"', async () => {
    const tag = `pend${randomUUID().slice(0, 8)}`
    const waiting = await makeMember({ name: `Awaiting ${tag}`, paidDays: null, approved: false })
    const approved = await makeMember({ name: `Unpaid ${tag}`, paidDays: null })
    const items = (await listTagged(tag, { status: 'pending' })).items
    const byId = new Map(items.map(i => [i.id, i]))
    expect(byId.get(waiting.memberId)).toMatchObject({ status: 'pending', approvedAt: null })
    expect(byId.get(approved.memberId)?.status).toBe('pending')
    expect(byId.get(approved.memberId)?.approvedAt).toMatch(/^\d{4}-\d{2}-\d{2}T/)
  })
})
