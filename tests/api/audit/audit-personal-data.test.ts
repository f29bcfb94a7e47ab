import { randomUUID } from 'node:crypto'
import { describe, expect, inject, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeAuditEvent, makeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { AuditEventDto, Paged } from '../../../shared/types/dto'

// The audit trail can never be changed or erased, so its rows name people by id only (the trail joins
// their current names when read) and record which contact fields changed, never the values.

interface AuditRow {
  action: string
  actor_membership_id: string | null
  actor_name: string | null
  before: Record<string, unknown> | null
  after: Record<string, unknown> | null
  reason: string | null
}

const rowsAbout = (subjectId: string) => sql<AuditRow>(`SELECT action, actor_membership_id, actor_name, before, after, reason
  FROM audit_events WHERE subject_id = $1 ORDER BY created_at, id`, [subjectId])
const trail = (query: Record<string, string>) => api<Paged<AuditEventDto>>('/api/audit', { as: 'admin', query: { pageSize: '100', ...query } })

describe('a borrowed name does not hide who acted', () => {
  it('shows the true actor after an admin takes another officer\'s name, acts and renames back', async () => {
    const a = await makeMember({ roles: ['admin'], name: `Corin Wakefield ${randomUUID().slice(0, 6)}` })
    const b = await makeMember({ roles: ['admin', 'safety_officer'], name: `Isolde Marrow ${randomUUID().slice(0, 6)}` })
    const target = await makeMember()
    const cookie = await signIn(inject('baseUrl'), a.email, a.password)

    // A takes B's name on their own profile, suspends a member, and takes their own name back as an admin edit.
    const borrowed = await api('/api/me/profile', { method: 'PATCH', as: cookie, body: { name: b.name, unitPreference: 'bar' } })
    expect(borrowed.status).toBe(200)
    expect(borrowed.body.name).toBe(b.name)
    const act = await api(`/api/members/${target.memberId}/suspend`, { method: 'POST', as: cookie, body: { reason: 'Left the pad unattended' } })
    expect(act.status).toBe(200)
    const back = await api(`/api/members/${a.memberId}`, { method: 'PATCH', as: cookie, body: { name: a.name } })
    expect(back.status).toBe(200)

    const suspension = (await trail({ subjectId: target.memberId })).body.items
    expect(suspension).toHaveLength(1)
    expect(suspension[0]).toMatchObject({ action: 'member.suspend', actorId: a.memberId, actorName: a.name })

    const renames = (await trail({ subjectId: a.memberId, action: 'member.rename' })).body.items
    expect(renames).toHaveLength(2)
    for (const event of renames) {
      expect(event).toMatchObject({ actorId: a.memberId, actorName: a.name, subjectName: a.name, before: null, after: { changed: ['name'] } })
    }

    // In the table itself: the actor's id, and neither name anywhere in A's rows.
    const rows = [...await rowsAbout(target.memberId), ...await rowsAbout(a.memberId)]
    expect(rows.map(r => r.action).sort()).toEqual(['member.rename', 'member.rename', 'member.suspend'])
    expect(rows.every(r => r.actor_membership_id === a.memberId && r.actor_name === null)).toBe(true)
    expect(JSON.stringify(rows)).not.toContain(a.name)
    expect(JSON.stringify(rows)).not.toContain(b.name)
  })

  it('the database refuses a new row that copies a name beside the actor\'s id', async () => {
    const m = await makeMember()
    await expect(makeAuditEvent({ actorMemberId: m.memberId, actorName: 'Someone Else', action: 'test.named_actor' }))
      .rejects.toThrow(/audit_events_actor_by_id/)
  })

  it('audits no own contact edit, only an own name change', async () => {
    const m = await makeMember()
    const cookie = await signIn(inject('baseUrl'), m.email, m.password)
    const contact = await api('/api/me/profile', { method: 'PATCH', as: cookie, body: { name: m.name, phone: '+44 1632 960777', unitPreference: 'psi' } })
    expect(contact.status).toBe(200)
    expect(await rowsAbout(m.memberId)).toEqual([])
    const hidden = await api('/api/me/profile', { method: 'PATCH', as: cookie, body: { name: `${m.name}\u202E`, unitPreference: 'psi' } })
    expect(hidden.status).toBe(400)
    expect(hidden.body.data.fields.name).toBeTruthy()
    expect((await api('/api/me/profile', { method: 'PATCH', as: cookie, body: { name: `${m.name}-Hale`, unitPreference: 'psi' } })).status).toBe(200)
    expect(await rowsAbout(m.memberId)).toEqual([
      { action: 'member.rename', actor_membership_id: m.memberId, actor_name: null, before: null, after: { changed: ['name'] }, reason: null },
    ])
  })
})

describe('no personal data in the append-only rows', () => {
  it('records which contact fields an admin changed, not their values, and says so in words', async () => {
    const m = await makeMember()
    const values = { phone: '+44 1632 960321', emergencyContactName: 'Tamsin Gullwing', emergencyContactPhone: '01632 960654', birthDate: '1984-05-06' }
    const res = await api(`/api/members/${m.memberId}`, { method: 'PATCH', as: 'admin', body: { ...values, reason: 'Updated at the spring launch' } })
    expect(res.status).toBe(200)
    const rows = await rowsAbout(m.memberId)
    expect(rows).toHaveLength(1)
    expect(rows[0]).toMatchObject({ action: 'member.edit', before: null, after: { changed: ['phone', 'emergencyContactName', 'emergencyContactPhone', 'birthDate'] } })
    const text = JSON.stringify(rows)
    for (const value of Object.values(values)) expect(text).not.toContain(value)

    const [event] = (await trail({ subjectId: m.memberId })).body.items
    expect(event).toMatchObject({ action: 'member.edit', actorName: 'Anselm Brackwater', after: { changed: ['phone', 'emergencyContactName', 'emergencyContactPhone', 'birthDate'] } })
  })

  it('keeps the sign-up and its guardian out of the trail but for ids and statuses', async () => {
    const email = `audit-junior-${randomUUID().slice(0, 8)}@test.hoopwise.example`
    const guardianEmail = `audit-guardian-${randomUUID().slice(0, 8)}@test.hoopwise.example`
    const birthDate = clubDay(-14 * 365)
    const signup = await api('/api/auth/signup', {
      body: { name: 'Wren Saltmarsh', email, password: 'a-long-password-1', birthDate, guardianName: 'Hollis Saltmarsh', guardianEmail },
    })
    expect(signup.status).toBe(201)
    const [member] = await sql<{ id: string }>('SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1', [email])
    const rows = await rowsAbout(member!.id)
    expect(rows).toEqual([{
      action: 'member.signed_up', actor_membership_id: member!.id, actor_name: null, before: null, after: { status: 'pending', junior: true }, reason: null,
    }])
    const text = JSON.stringify(rows).toLowerCase()
    for (const value of [email, guardianEmail, 'wren saltmarsh', 'hollis saltmarsh', birthDate]) expect(text).not.toContain(value)
  })

  it('keeps the approval to statuses and times', async () => {
    const m = await makeMember({ approved: false, paidDays: null })
    expect((await api(`/api/members/${m.memberId}/approve`, { method: 'POST', as: 'admin', body: { reason: 'Known to the club' } })).status).toBe(200)
    const rows = await rowsAbout(m.memberId)
    expect(rows.map(r => r.action)).toEqual(['member.approve'])
    expect(Object.keys(rows[0]!.after ?? {}).sort()).toEqual(['approvedAt', 'status'])
    expect(rows[0]!.actor_name).toBeNull()
    const text = JSON.stringify(rows).toLowerCase()
    for (const value of [m.email, m.name.toLowerCase()]) expect(text).not.toContain(value)
  })
})
