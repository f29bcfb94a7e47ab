import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeClub, makeMember, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { Paged } from '../../../shared/types/common'
import type { VesselDto, VesselListItemDto } from '../../../shared/types/vessels'

type Page = Paged<VesselListItemDto>

const bottle = (name: string) => ({ name, construction: 'single_bottle', volumeL: 2, diameterMm: 102 })
const wrapped = (name: string) => ({
  name, construction: 'overwrapped_liner', volumeL: 3.1, diameterMm: 104.5, fibreClass: 'e_glass',
  arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3, resin: 'Laminating epoxy', lastLayupOn: '2026-01-10',
})

/** A prefix of five random capitals: a club of the test's own, so its tag counter is the test's alone. */
function randomPrefix(): string {
  return Array.from({ length: 5 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
}

/** A member of club `clubId` (the demo club when absent) and their session cookie. */
async function memberWithCookie(clubId?: string, name?: string): Promise<MadeMember & { cookie: string }> {
  const m = await makeMember({ clubId, name })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

async function register(cookie: string, body: unknown) {
  return api<VesselDto & { data: { fields: Record<string, string> } }>('/api/vessels', { method: 'POST', as: cookie, body })
}

describe('POST /api/vessels: a member registers a vessel and the club assigns the tag', () => {
  const prefix = randomPrefix()
  let owner: MadeMember & { cookie: string }

  beforeAll(async () => {
    const club = await makeClub({ name: `Vessel Club ${prefix}`, tagPrefix: prefix })
    owner = await memberWithCookie(club.id)
  })

  it('registers the first vessel as PREFIX-0001, awaiting proof, owned by the member', async () => {
    const res = await register(owner.cookie, wrapped('Blue Heron'))
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      tag: `${prefix}-0001`, name: 'Blue Heron', construction: 'overwrapped_liner', state: 'awaiting_proof',
      volumeL: 3.1, diameterMm: 104.5, fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3,
      resin: 'Laminating epoxy', lastLayupOn: '2026-01-10', metalInPressurePath: false,
      owner: { id: owner.memberId, name: owner.name },
    })
    expect(res.body.tag).toMatch(/^[A-Z]{2,5}-\d{4}$/)
    const [row] = await sql<{ owner_membership_id: string, number: number }>('SELECT owner_membership_id, number FROM vessels WHERE id = $1', [res.body.id])
    expect(row).toEqual({ owner_membership_id: owner.memberId, number: 1 })
  })

  it('gives simultaneous registrations distinct, consecutive tags', async () => {
    const results = await Promise.all(Array.from({ length: 6 }, (_, i) => register(owner.cookie, bottle(`Racer ${i}`))))
    expect(results.map(r => r.status)).toEqual(Array(6).fill(201))
    const numbers = results.map(r => Number(r.body.tag.slice(prefix.length + 1))).sort((a, b) => a - b)
    const first = numbers[0]!
    expect(numbers).toEqual(numbers.map((_, i) => first + i))
    expect(new Set(results.map(r => r.body.tag)).size).toBe(6)
    const [club] = await sql<{ next_vessel_number: number }>('SELECT next_vessel_number FROM clubs WHERE tag_prefix = $1', [prefix])
    expect(club!.next_vessel_number).toBe(first + 6)
  })

  it.each([
    ['a missing name and a negative volume', { ...bottle(''), volumeL: -1 }, ['name', 'volumeL']],
    ['an unknown construction and a zero diameter', { ...bottle('X'), construction: 'rocket', diameterMm: 0 }, ['construction', 'diameterMm']],
    ['a laminated construction without its laminate', { ...bottle('Tube'), construction: 'mandrel_tube' }, ['fibreClass', 'arealWeightGPerM2', 'weave', 'plies']],
    ['half a laminate', { ...bottle('Half'), fibreClass: 'carbon', plies: 2 }, ['arealWeightGPerM2', 'weave']],
    ['a volume given as text, fractional plies', { ...wrapped('Odd'), volumeL: '2', plies: 1.5 }, ['volumeL', 'plies']],
  ])('refuses %s with 400 naming the fields', async (_label, body, fields) => {
    const before = await sql<{ n: number }>('SELECT count(*)::int AS n FROM vessels WHERE owner_membership_id = $1', [owner.memberId])
    const res = await register(owner.cookie, body)
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields).sort()).toEqual([...fields].sort())
    expect(await sql('SELECT count(*)::int AS n FROM vessels WHERE owner_membership_id = $1', [owner.memberId])).toEqual(before)
  })

  it('answers 401 when signed out', async () => {
    expect((await api('/api/vessels', { method: 'POST', body: bottle('Nobody') })).status).toBe(401)
  })

  it('keeps another club\'s vessels from the demo club\'s officers (404, and not in their list)', async () => {
    const res = await register(owner.cookie, bottle('Far Away'))
    expect((await api(`/api/vessels/${res.body.id}`, { as: 'safety' })).status).toBe(404)
    const list = await api<Page>('/api/vessels', { as: 'safety', query: { q: res.body.tag } })
    expect(list.body.total).toBe(0)
  })

  it.each([
    ['a zero volume', `volume_l = 0`],
    ['a negative diameter', `diameter_mm = -1`],
    ['an unknown state', `state = 'exploded'`],
    ['half a laminate', `fibre_class = 'carbon'`],
    ['a tag that is not PREFIX-number', `tag = 'srg-1'`],
  ])('refuses %s in the database itself', async (_label, change) => {
    // A plain bottle, no laminate: any part of one is only half of it.
    const [row] = await sql<{ id: string }>(`SELECT id FROM vessels WHERE owner_membership_id = $1 AND construction = 'single_bottle' LIMIT 1`, [owner.memberId])
    await expect(sql(`UPDATE vessels SET ${change} WHERE id = $1`, [row!.id])).rejects.toThrow(/check constraint/)
  })

  it('refuses a second vessel with a number or tag the club has used (unique keys)', async () => {
    const [row] = await sql<{ club_id: string, number: number, tag: string }>('SELECT club_id, number, tag FROM vessels WHERE owner_membership_id = $1 LIMIT 1', [owner.memberId])
    await expect(sql(`INSERT INTO vessels (club_id, owner_membership_id, number, tag, name, construction, volume_l, diameter_mm)
      VALUES ($1, $2, $3, $4, 'Copy', 'single_bottle', 1, 90)`, [row!.club_id, owner.memberId, row!.number, `${prefix}-9999`])).rejects.toThrow(/duplicate key/)
    await expect(sql(`INSERT INTO vessels (club_id, owner_membership_id, number, tag, name, construction, volume_l, diameter_mm)
      VALUES ($1, $2, 9999, $3, 'Copy', 'single_bottle', 1, 90)`, [row!.club_id, owner.memberId, row!.tag])).rejects.toThrow(/duplicate key/)
  })
})

describe('GET /api/vessels and /api/vessels/[id]: members see their own, officers see all', () => {
  const tag = `ves${randomUUID().slice(0, 8)}`
  let alice: MadeMember & { cookie: string }
  let bruno: MadeMember & { cookie: string }
  const alices: VesselDto[] = []
  const brunos: VesselDto[] = []

  beforeAll(async () => {
    alice = await memberWithCookie(undefined, `Alice ${tag}`)
    bruno = await memberWithCookie(undefined, `Bruno ${tag}`)
    for (const i of [1, 2, 3]) alices.push((await register(alice.cookie, i === 2 ? wrapped(`Alice wrap ${i}`) : bottle(`Alice bottle ${i}`))).body)
    for (const i of [1, 2]) brunos.push((await register(bruno.cookie, bottle(`Bruno bottle ${i}`))).body)
  })

  it('shows a member only their own vessels, whatever owner they ask for', async () => {
    const mine = await api<Page>('/api/vessels', { as: alice.cookie, query: { pageSize: 100 } })
    expect(mine.status).toBe(200)
    expect(mine.body.total).toBe(3)
    expect(mine.body.items.map(v => v.tag)).toEqual(alices.map(v => v.tag))
    const sneaky = await api<Page>('/api/vessels', { as: alice.cookie, query: { owner: bruno.memberId } })
    expect(sneaky.body.items.map(v => v.owner.id)).toEqual(alices.map(() => alice.memberId))
  })

  it('answers 404 for another member\'s vessel, and shows the owner theirs', async () => {
    const other = await api(`/api/vessels/${brunos[0]!.id}`, { as: alice.cookie })
    expect(other.status).toBe(404)
    expect(JSON.stringify(other.body)).not.toContain(brunos[0]!.tag)
    expect((await api(`/api/vessels/${brunos[0]!.id}`, { as: 'member' })).status).toBe(404)
    const own = await api<VesselDto>(`/api/vessels/${brunos[0]!.id}`, { as: bruno.cookie })
    expect(own.status).toBe(200)
    expect(own.body).toEqual(brunos[0])
    expect((await api(`/api/vessels/${randomUUID()}`, { as: bruno.cookie })).status).toBe(404)
    expect((await api('/api/vessels/not-a-uuid', { as: bruno.cookie })).status).toBe(404)
  })

  it.each(['instructor', 'safety'] as const)('shows a %s (vessels.read_all) every member\'s vessel', async (as) => {
    const res = await api<VesselDto>(`/api/vessels/${alices[1]!.id}`, { as })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ tag: alices[1]!.tag, owner: { id: alice.memberId, name: alice.name }, plies: 3 })
  })

  it('pages, sorts and filters the club\'s vessels for an officer', async () => {
    const all = [...alices, ...brunos]
    const pages = await Promise.all([1, 2, 3].map(page => api<Page>('/api/vessels', { as: 'safety', query: { q: tag, pageSize: 2, page } })))
    expect(pages.map(p => p.body.total)).toEqual([5, 5, 5])
    expect(pages.map(p => p.body.items.length)).toEqual([2, 2, 1])
    // Sorted by tag by default: the club's running number.
    const byTag = [...all].sort((a, b) => a.tag.localeCompare(b.tag, 'en', { numeric: true })).map(v => v.tag)
    expect(pages.flatMap(p => p.body.items.map(v => v.tag))).toEqual(byTag)

    const byOwnerDesc = await api<Page>('/api/vessels', { as: 'safety', query: { q: tag, sort: 'owner', dir: 'desc', pageSize: 100 } })
    expect(byOwnerDesc.body.items.map(v => v.owner.name)).toEqual([bruno.name, bruno.name, alice.name, alice.name, alice.name])

    const brunoOnly = await api<Page>('/api/vessels', { as: 'instructor', query: { owner: bruno.memberId } })
    expect(brunoOnly.body.items.map(v => v.id).sort()).toEqual(brunos.map(v => v.id).sort())

    const wraps = await api<Page>('/api/vessels', { as: 'safety', query: { q: tag, construction: 'overwrapped_liner' } })
    expect(wraps.body.items.map(v => v.id)).toEqual([alices[1]!.id])

    await sql(`UPDATE vessels SET state = 'retired' WHERE id = $1`, [brunos[1]!.id])
    const retired = await api<Page>('/api/vessels', { as: 'safety', query: { q: tag, state: 'retired' } })
    expect(retired.body.items.map(v => v.id)).toEqual([brunos[1]!.id])

    const byTagSearch = await api<Page>('/api/vessels', { as: 'safety', query: { q: alices[0]!.tag.toLowerCase() } })
    expect(byTagSearch.body.items.map(v => v.id)).toContain(alices[0]!.id)
  })

  it('refuses a bad list query with 400', async () => {
    const res = await api('/api/vessels', { as: 'safety', query: { state: 'exploded', sort: 'colour' } })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields).sort()).toEqual(['sort', 'state'])
  })
})

describe('the demo club\'s seeded vessels', () => {
  it('gives the demo member their vessels once each, tagged from the club\'s counter', async () => {
    const res = await api<Page>('/api/vessels', { as: 'member', query: { pageSize: 100 } })
    expect(res.status).toBe(200)
    const seeded = res.body.items.filter(v => ['Gull', 'Twin Tern', 'Petrel'].includes(v.name))
    expect(seeded.map(v => v.name).sort()).toEqual(['Gull', 'Petrel', 'Twin Tern'])
    for (const v of seeded) expect(v.tag).toMatch(/^SRG-\d{4}$/)
    expect(seeded.find(v => v.name === 'Petrel')!.state).toBe('awaiting_proof')
    const petrel = await api<VesselDto>(`/api/vessels/${seeded.find(v => v.name === 'Petrel')!.id}`, { as: 'member' })
    expect(petrel.body).toMatchObject({ fibreClass: 'e_glass', plies: 3, weave: 'woven_0_90' })
    expect(petrel.body.lastLayupOn).toMatch(/^\d{4}-\d{2}-\d{2}$/)
    const [counter] = await sql<{ next_vessel_number: number, highest: number }>(
      `SELECT c.next_vessel_number, (SELECT max(number) FROM vessels v WHERE v.club_id = c.id) AS highest FROM clubs c WHERE c.tag_prefix = 'SRG'`)
    expect(counter!.next_vessel_number).toBeGreaterThan(counter!.highest)
  })
})
