import { describe, expect, inject, it } from 'vitest'
import { api } from '../support/http'
import { sql } from '../support/db'
import { makeMember } from '../support/factories'
import { signIn } from '../support/global-setup'

const putRoles = (id: string, body: unknown, as = 'admin') => api(`/api/members/${id}/roles`, { method: 'PUT', as, body })
const rolesOf = async (id: string) => (await sql<{ roles: string[] }>(`SELECT roles FROM memberships WHERE id = $1`, [id]))[0]!.roles

describe('PUT /api/members/:id/roles', () => {
  it('grants a role that bites on the next request, audits before/after, and removing it takes the right away', async () => {
    const m = await makeMember()
    const cookie = await signIn(inject('baseUrl'), m.email, m.password)
    expect((await api('/api/members', { as: cookie })).status).toBe(403)

    const grant = await putRoles(m.memberId, { roles: ['instructor'], reason: 'Passed the instructor assessment' })
    expect(grant.status).toBe(200)
    expect(grant.body.roles).toEqual(['member', 'instructor'])
    // Same cookie, which still carries the old roles: the server re-reads them from the database.
    expect((await api('/api/members', { as: cookie })).status).toBe(200)

    const remove = await putRoles(m.memberId, { roles: ['member'], reason: 'Stepped down as instructor' })
    expect(remove.body.roles).toEqual(['member'])
    expect((await api('/api/members', { as: cookie })).status).toBe(403)

    const events = await sql<{ action: string, before: unknown, after: unknown, reason: string, actor_membership_id: string }>(
      `SELECT action, before, after, reason, actor_membership_id FROM audit_events WHERE subject_id = $1 ORDER BY created_at, id`, [m.memberId])
    expect(events.map(({ actor_membership_id: _, ...e }) => e)).toEqual([
      { action: 'member.roles', before: { roles: ['member'] }, after: { roles: ['member', 'instructor'] }, reason: 'Passed the instructor assessment' },
      { action: 'member.roles', before: { roles: ['member', 'instructor'] }, after: { roles: ['member'] }, reason: 'Stepped down as instructor' },
    ])
    const [admin] = await sql<{ id: string }>(`SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = 'admin@hoopwise.example'`)
    expect(events[0]!.actor_membership_id).toBe(admin!.id)
  })

  it('always keeps the member role, orders roles, and writes nothing when nothing changes', async () => {
    const m = await makeMember({ roles: ['instructor'] })
    const res = await putRoles(m.memberId, { roles: ['admin', 'safety_officer', 'admin'], reason: 'Committee vote' })
    expect(res.status).toBe(200)
    expect(res.body.roles).toEqual(['member', 'safety_officer', 'admin'])
    expect(await rolesOf(m.memberId)).toEqual(['member', 'safety_officer', 'admin'])
    expect((await putRoles(m.memberId, { roles: [], reason: 'Back to member' })).body.roles).toEqual(['member'])
    expect((await putRoles(m.memberId, { roles: ['member'], reason: 'No change at all' })).status).toBe(200)
    const [{ count }] = await sql<{ count: number }>(`SELECT count(*)::int AS count FROM audit_events WHERE subject_id = $1`, [m.memberId]) as [{ count: number }]
    expect(count).toBe(2)
  })

  it('refuses an admin changing their own roles (422 OWN_ROLES)', async () => {
    const admin = await makeMember({ roles: ['admin'] })
    const cookie = await signIn(inject('baseUrl'), admin.email, admin.password)
    const res = await putRoles(admin.memberId, { roles: ['admin', 'safety_officer'], reason: 'Promoting myself' }, cookie)
    expect(res.status).toBe(422)
    expect(res.body.data.reasons).toEqual([{ code: 'OWN_ROLES', message: expect.stringMatching(/own roles/) }])
    expect(await rolesOf(admin.memberId)).toEqual(['member', 'admin'])
  })

  it.each(['member', 'instructor', 'safety'])('refuses a %s with 403', async (as) => {
    const m = await makeMember()
    expect((await putRoles(m.memberId, { roles: ['instructor'], reason: 'Not my call' }, as)).status).toBe(403)
    expect(await rolesOf(m.memberId)).toEqual(['member'])
  })

  it.each([
    [{ roles: ['captain'], reason: 'Unknown role' }, 'roles.0'],
    [{ roles: 'admin', reason: 'Not a list' }, 'roles'],
    [{ roles: ['instructor'] }, 'reason'],
    [{ reason: 'No roles given' }, 'roles'],
  ])('refuses %o with 400', async (body, field) => {
    const m = await makeMember()
    const res = await putRoles(m.memberId, body)
    expect(res.status).toBe(400)
    expect(res.body.data.fields[field]).toBeTruthy()
    expect(await rolesOf(m.memberId)).toEqual(['member'])
  })
})
