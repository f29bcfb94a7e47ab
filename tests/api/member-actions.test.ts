import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api } from '../support/http'
import { sql } from '../support/db'
import { makeMember, clubDay } from '../support/factories'
import { signIn } from '../support/global-setup'
import { waitForMail, linkIn } from '../support/mail'

const post = (id: string, action: string, body: unknown = { reason: 'Decided at the committee meeting' }, as = 'admin') =>
  api(`/api/members/${id}/${action}`, { method: 'POST', as, body })

const auditOf = (subjectId: string) => sql<{ action: string, before: Record<string, unknown>, after: Record<string, unknown>, reason: string, actor_name: string }>(
  `SELECT action, before, after, reason, actor_name FROM audit_events WHERE subject_id = $1 ORDER BY created_at, id`, [subjectId])

const codeOf = (res: { body: { data?: { reasons?: { code: string }[] } } }) => res.body.data?.reasons?.map(r => r.code)

describe('approving a sign-up', () => {
  it('approves a never-approved pending sign-up once, audits it and e-mails the member', async () => {
    const m = await makeMember({ approved: false, paidDays: null })
    const res = await post(m.memberId, 'approve', { reason: 'Known to the club' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: m.memberId, status: 'pending' })
    expect(res.body.approvedAt).toBeTruthy()
    const mail = await waitForMail(m.email, /Welcome to Saltmarsh Rocketry Guild/)
    expect(linkIn(mail, '/standing').origin).toBe(inject('baseUrl'))
    const [event] = await auditOf(m.memberId)
    expect(event).toMatchObject({ action: 'member.approve', reason: 'Known to the club', actor_name: 'Anselm Brackwater' })
    expect(event!.before).toMatchObject({ status: 'pending', approvedAt: null })
    expect(event!.after.approvedAt).toBeTruthy()

    const again = await post(m.memberId, 'approve')
    expect(again.status).toBe(422)
    expect(codeOf(again)).toEqual(['ALREADY_APPROVED'])
  })

  it('refuses to approve a membership that is not a pending sign-up', async () => {
    const paid = await makeMember({ approved: false, paidDays: 30 })
    const res = await post(paid.memberId, 'approve')
    expect(res.status).toBe(422)
    expect(codeOf(res)).toEqual(['NOT_PENDING'])
    const [row] = await sql<{ approved_at: Date | null }>(`SELECT approved_at FROM memberships WHERE id = $1`, [paid.memberId])
    expect(row!.approved_at).toBeNull()
  })
})

describe('suspending and reinstating', () => {
  it('a suspension bites on the member\'s next request, and reinstating gives the rights back', async () => {
    const instructor = await makeMember({ roles: ['instructor'] })
    const cookie = await signIn(inject('baseUrl'), instructor.email, instructor.password)
    expect((await api('/api/members', { as: cookie })).status).toBe(200)

    const res = await post(instructor.memberId, 'suspend', { reason: 'Filled without a supervisor' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ status: 'suspended', suspendedReason: 'Filled without a supervisor' })
    expect((await api('/api/members', { as: cookie })).status).toBe(403)

    const twice = await post(instructor.memberId, 'suspend')
    expect(twice.status).toBe(422)
    expect(codeOf(twice)).toEqual(['ALREADY_SUSPENDED'])

    const back = await post(instructor.memberId, 'reinstate', { reason: 'Retrained and briefed' })
    expect(back.status).toBe(200)
    expect(back.body).toMatchObject({ status: 'active', suspendedAt: null, suspendedReason: null })
    expect((await api('/api/members', { as: cookie })).status).toBe(200)
    const notSuspended = await post(instructor.memberId, 'reinstate')
    expect(notSuspended.status).toBe(422)
    expect(codeOf(notSuspended)).toEqual(['NOT_SUSPENDED'])

    const events = await auditOf(instructor.memberId)
    expect(events.map(e => e.action)).toEqual(['member.suspend', 'member.reinstate'])
    expect(events[0]).toMatchObject({ reason: 'Filled without a supervisor', before: { status: 'active', suspendedAt: null } })
    expect(events[0]!.after).toMatchObject({ status: 'suspended', suspendedReason: 'Filled without a supervisor' })
    expect(events[1]).toMatchObject({ reason: 'Retrained and briefed', after: { status: 'active', suspendedAt: null } })
  })

  it.each([
    [undefined, 'reason'],
    [{}, 'reason'],
    [{ reason: '  ab ' }, 'reason'],
    [{ reason: 'x'.repeat(501) }, 'reason'],
  ])('requires a reason (%o → 400) and writes nothing', async (body, field) => {
    const m = await makeMember()
    const res = await api(`/api/members/${m.memberId}/suspend`, { method: 'POST', as: 'admin', body })
    expect(res.status).toBe(400)
    expect(res.body.data.fields[field]).toBeTruthy()
    const [row] = await sql<{ suspended_at: Date | null }>(`SELECT suspended_at FROM memberships WHERE id = $1`, [m.memberId])
    expect(row!.suspended_at).toBeNull()
    expect(await auditOf(m.memberId)).toEqual([])
  })

  it('answers 400 for malformed JSON', async () => {
    const m = await makeMember()
    const res = await api(`/api/members/${m.memberId}/suspend`, { method: 'POST', as: 'admin', body: '{"reason": ' })
    expect(res.status).toBe(400)
  })
})

describe('resigning and rejoining', () => {
  it('marks resigned, refuses it twice, and rejoining lets the member stand on their dues again', async () => {
    const m = await makeMember({ paidDays: -100 })
    const res = await post(m.memberId, 'resign', { reason: 'Moved away' })
    expect(res.status).toBe(200)
    expect(res.body.status).toBe('resigned')
    expect(res.body.resignedAt).toBeTruthy()
    expect(codeOf(await post(m.memberId, 'resign'))).toEqual(['ALREADY_RESIGNED'])
    const suspend = await post(m.memberId, 'suspend')
    expect(suspend.status).toBe(422)
    expect(codeOf(suspend)).toEqual(['MEMBER_RESIGNED'])

    const rejoin = await post(m.memberId, 'rejoin', { reason: 'Back in the area' })
    expect(rejoin.status).toBe(200)
    expect(rejoin.body).toMatchObject({ status: 'lapsed', resignedAt: null, paidThrough: clubDay(-100) })
    const again = await post(m.memberId, 'rejoin')
    expect(again.status).toBe(422)
    expect(codeOf(again)).toEqual(['NOT_RESIGNED'])
    expect((await auditOf(m.memberId)).map(e => [e.action, e.before.status, e.after.status]))
      .toEqual([['member.resign', 'lapsed', 'resigned'], ['member.rejoin', 'resigned', 'lapsed']])
  })
})

describe('limits on membership actions', () => {
  it('an admin cannot suspend or resign their own membership', async () => {
    const admin = await makeMember({ roles: ['admin'] })
    const cookie = await signIn(inject('baseUrl'), admin.email, admin.password)
    for (const action of ['suspend', 'resign']) {
      const res = await post(admin.memberId, action, { reason: 'Trying it on myself' }, cookie)
      expect(res.status).toBe(422)
      expect(codeOf(res)).toEqual(['SELF_ACTION'])
    }
    const [row] = await sql<{ suspended_at: Date | null, resigned_at: Date | null }>(
      `SELECT suspended_at, resigned_at FROM memberships WHERE id = $1`, [admin.memberId])
    expect(row).toEqual({ suspended_at: null, resigned_at: null })
  })

  it.each(['member', 'instructor', 'safety'])('refuses every action to a %s with 403', async (as) => {
    const m = await makeMember()
    for (const action of ['approve', 'suspend', 'reinstate', 'resign', 'rejoin']) {
      expect((await post(m.memberId, action, undefined, as)).status).toBe(403)
    }
    expect((await api(`/api/members/${m.memberId}`, { method: 'PATCH', as, body: { phone: '+44 1632 960000' } })).status).toBe(403)
    expect(await auditOf(m.memberId)).toEqual([])
  })

  it('answers 401 when signed out', async () => {
    const m = await makeMember()
    expect((await api(`/api/members/${m.memberId}/suspend`, { method: 'POST', body: { reason: 'No session here' } })).status).toBe(401)
  })

  it('treats a membership of another club as missing (404), and an id that is not one as well', async () => {
    const tag = randomUUID().slice(0, 8)
    const prefix = Array.from({ length: 5 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
    const [club] = await sql<{ id: string }>(`INSERT INTO clubs (name, tag_prefix, time_zone, public_url)
      VALUES ($1, $2, 'Europe/Paris', 'https://other.example') RETURNING id`, [`Other Club ${tag}`, prefix])
    const [user] = await sql<{ id: string }>(`INSERT INTO users (email, name, password_hash) VALUES ($1, $2, 'x') RETURNING id`,
      [`other-${tag}@test.hoopwise.example`, `Outsider ${tag}`])
    const [other] = await sql<{ id: string }>(`INSERT INTO memberships (club_id, user_id, paid_through) VALUES ($1, $2, $3) RETURNING id`,
      [club!.id, user!.id, clubDay(100)])
    const id = other!.id
    expect((await api(`/api/members/${id}`, { as: 'admin' })).status).toBe(404)
    for (const action of ['approve', 'suspend', 'reinstate', 'resign', 'rejoin']) expect((await post(id, action)).status).toBe(404)
    expect((await api(`/api/members/${id}`, { method: 'PATCH', as: 'admin', body: { name: 'Renamed' } })).status).toBe(404)
    expect((await api(`/api/members/${id}/roles`, { method: 'PUT', as: 'admin', body: { roles: ['instructor'], reason: 'Not ours' } })).status).toBe(404)
    expect((await api('/api/members', { as: 'admin', query: { q: `Outsider ${tag}` } })).body.total).toBe(0)
    expect((await api('/api/members/not-a-uuid', { as: 'admin' })).status).toBe(404)
    const [row] = await sql<{ suspended_at: Date | null, roles: string[] }>(`SELECT suspended_at, roles FROM memberships WHERE id = $1`, [id])
    expect(row).toEqual({ suspended_at: null, roles: ['member'] })
  })
})

describe('reading and editing a member', () => {
  let member: Awaited<ReturnType<typeof makeMember>>
  beforeAll(async () => {
    member = await makeMember({ name: `Editable ${randomUUID().slice(0, 8)}` })
  })

  it('shows the page to officers and to the member themselves, not to other members', async () => {
    expect((await api(`/api/members/${member.memberId}`, { as: 'instructor' })).body).toMatchObject({ id: member.memberId, name: member.name })
    const own = await signIn(inject('baseUrl'), member.email, member.password)
    const mine = await api(`/api/members/${member.memberId}`, { as: own })
    expect(mine.status).toBe(200)
    expect(mine.body.waiver.current).toBe(true)
    expect((await api(`/api/members/${member.memberId}`, { as: 'member' })).status).toBe(403)
    expect((await api(`/api/members/${member.memberId}`)).status).toBe(401)
  })

  it('edits details and audits before/after of the changed fields only', async () => {
    const [before] = await sql<{ phone: string | null }>(`SELECT phone FROM memberships WHERE id = $1`, [member.memberId])
    const res = await api(`/api/members/${member.memberId}`, {
      method: 'PATCH',
      as: 'admin',
      body: { name: `${member.name} Jr`, phone: '+44 1632 960123', unitPreference: 'bar', emergencyContactName: 'Rhea Saltreed' },
    })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: `${member.name} Jr`, phone: '+44 1632 960123', emergencyContactName: 'Rhea Saltreed' })
    const events = await auditOf(member.memberId)
    const edit = events.find(e => e.action === 'member.edit')!
    // unitPreference was already 'bar': not a change, so not in the event.
    expect(edit.before).toEqual({ name: member.name, phone: before!.phone, emergencyContactName: null })
    expect(edit.after).toEqual({ name: `${member.name} Jr`, phone: '+44 1632 960123', emergencyContactName: 'Rhea Saltreed' })

    const same = await api(`/api/members/${member.memberId}`, { method: 'PATCH', as: 'admin', body: { phone: '+44 1632 960123' } })
    expect(same.status).toBe(200)
    expect((await auditOf(member.memberId)).filter(e => e.action === 'member.edit')).toHaveLength(1)
  })

  it.each([
    [{}, '_'],
    [{ phone: 'call me' }, 'phone'],
    [{ birthDate: '2020-02-30' }, 'birthDate'],
    [{ guardianEmail: 'not-an-address' }, 'guardianEmail'],
    [{ name: 'x'.repeat(121) }, 'name'],
  ])('refuses %o with 400', async (body, field) => {
    const res = await api(`/api/members/${member.memberId}`, { method: 'PATCH', as: 'admin', body })
    expect(res.status).toBe(400)
    expect(res.body.data.fields[field]).toBeTruthy()
  })
})
