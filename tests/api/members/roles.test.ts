import { describe, expect, inject, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'

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

  it('refuses it as well when the admin writes their own id in upper case (422 OWN_ROLES)', async () => {
    const admin = await makeMember({ roles: ['admin'] })
    const cookie = await signIn(inject('baseUrl'), admin.email, admin.password)
    const res = await putRoles(admin.memberId.toUpperCase(), { roles: ['member'], reason: 'Stepping down myself' }, cookie)
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['OWN_ROLES'])
    expect(await rolesOf(admin.memberId)).toEqual(['member', 'admin'])
  })

  it('two admins removing each other\'s admin role at once: exactly one goes through, one admin remains', async () => {
    const [a, b] = await Promise.all([makeMember({ roles: ['admin'] }), makeMember({ roles: ['admin'] })])
    const [cookieA, cookieB] = await Promise.all([a!, b!].map(m => signIn(inject('baseUrl'), m.email, m.password)))
    const results = await Promise.all([
      putRoles(b!.memberId, { roles: ['member'], reason: 'Removed by the other admin' }, cookieA),
      putRoles(a!.memberId, { roles: ['member'], reason: 'Removed by the other admin' }, cookieB),
    ])
    expect(results.map(r => r.status).sort()).toEqual([200, 403])
    const roles = [await rolesOf(a!.memberId), await rolesOf(b!.memberId)]
    expect(roles.filter(r => r.includes('admin'))).toHaveLength(1)
    const events = await sql(`SELECT id FROM audit_events WHERE action = 'member.roles' AND subject_id = ANY($1::uuid[])`, [[a!.memberId, b!.memberId]])
    expect(events).toHaveLength(1)
  })

  it('maps a database refusal of a role change to 422, never 500', async () => {
    const m = await makeMember()
    // A constraint for this one member only (NOT VALID: other rows are not checked), dropped afterwards.
    const name = `test_roles_${m.memberId.replace(/-/g, '')}`
    await sql(`ALTER TABLE memberships ADD CONSTRAINT ${name} CHECK (id <> '${m.memberId}' OR cardinality(roles) = 1) NOT VALID`)
    try {
      const res = await putRoles(m.memberId, { roles: ['instructor'], reason: 'The database says no' })
      expect(res.status).toBe(422)
      expect(res.body.data.reasons.map((r: { code: string }) => r.code)).toEqual(['INVALID_RECORD'])
    }
    finally {
      await sql(`ALTER TABLE memberships DROP CONSTRAINT ${name}`)
    }
    expect(await rolesOf(m.memberId)).toEqual(['member'])
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
