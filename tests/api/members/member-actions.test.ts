import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { fromNow, makeClub, makeMember, makeNotice, clubDay } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import { waitForMail, linkIn, mailsTo } from '../../support/mail'

const post = (id: string, action: string, body: unknown = { reason: 'Decided at the committee meeting' }, as = 'admin') =>
  api(`/api/members/${id}/${action}`, { method: 'POST', as, body })

const auditOf = (subjectId: string) => sql<{ action: string, before: Record<string, unknown>, after: Record<string, unknown>, reason: string, actor_name: string | null, actor_membership_id: string | null }>(
  `SELECT action, before, after, reason, actor_name, actor_membership_id FROM audit_events WHERE subject_id = $1 ORDER BY created_at, id`, [subjectId])
const demoAdminId = async () => (await sql<{ id: string }>(
  `SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = 'admin@hoopwise.example'`))[0]!.id

const patch = (id: string, body: unknown, as = 'admin') => api(`/api/members/${id}`, { method: 'PATCH', as, body })
const CONSENT_SUBJECT = /asks for your consent/
const guardianAddress = (label: string) => `guardian-${label}-${randomUUID().slice(0, 8)}@test.hoopwise.example`
const tokenIn = async (address: string) => linkIn(await waitForMail(address, CONSENT_SUBJECT), '/guardian-consent').searchParams.get('token')!
const consentOf = async (id: string) => (await sql<{ guardian_consent_at: Date | null }>(
  'SELECT guardian_consent_at FROM memberships WHERE id = $1', [id]))[0]!.guardian_consent_at

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
    // The actor by id only: the trail joins their current name when it is read.
    expect(event).toMatchObject({ action: 'member.approve', reason: 'Known to the club', actor_name: null, actor_membership_id: await demoAdminId() })
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
    const before = await signIn(inject('baseUrl'), instructor.email, instructor.password)
    expect((await api('/api/members', { as: before })).status).toBe(200)

    const res = await post(instructor.memberId, 'suspend', { reason: 'Filled without a supervisor' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ status: 'suspended', suspendedReason: 'Filled without a supervisor' })
    // The suspension ended the session; signed in again, the member holds no capability.
    expect((await api('/api/members', { as: before })).status).toBe(401)
    const cookie = await signIn(inject('baseUrl'), instructor.email, instructor.password)
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
    expect(events[0]!.after).toMatchObject({ status: 'suspended' })
    // The reason is the event's own; it is not copied into after.
    expect(events[0]!.after).not.toHaveProperty('suspendedReason')
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
    const club = await makeClub({ name: `Other Club ${tag}`, tagPrefix: prefix, timeZone: 'Europe/Paris', publicUrl: 'https://other.example' })
    const { memberId: id } = await makeMember({
      clubId: club.id, email: `other-${tag}@test.hoopwise.example`, name: `Outsider ${tag}`, passwordHash: 'x',
      verified: false, approved: false, paidDays: 100, birthDate: null, acceptWaiver: false,
    })
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

  it('edits details and audits which fields changed, not their values', async () => {
    const res = await api(`/api/members/${member.memberId}`, {
      method: 'PATCH',
      as: 'admin',
      body: { name: `${member.name} Jr`, phone: '+44 1632 960123', unitPreference: 'bar', emergencyContactName: 'Rhea Saltreed' },
    })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: `${member.name} Jr`, phone: '+44 1632 960123', emergencyContactName: 'Rhea Saltreed' })
    const events = await auditOf(member.memberId)
    const edit = events.find(e => e.action === 'member.edit')!
    // unitPreference was already 'bar': not a change, so not in the event. The name has its own event.
    expect(edit.before).toBeNull()
    expect(edit.after).toEqual({ changed: ['phone', 'emergencyContactName'] })
    expect(JSON.stringify(events)).not.toMatch(/Rhea Saltreed|1632 960123| Jr/)
    expect(events.find(e => e.action === 'member.rename')).toMatchObject({ before: null, after: { changed: ['name'] } })

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

describe('self-checks and admins acting on each other', () => {
  it('refuses an admin suspending or resigning their own membership with the id written in upper case (SELF_ACTION)', async () => {
    const admin = await makeMember({ roles: ['admin'] })
    const cookie = await signIn(inject('baseUrl'), admin.email, admin.password)
    for (const action of ['suspend', 'resign']) {
      const res = await post(admin.memberId.toUpperCase(), action, { reason: 'Trying it on myself' }, cookie)
      expect(res.status).toBe(422)
      expect(codeOf(res)).toEqual(['SELF_ACTION'])
    }
    const [row] = await sql<{ suspended_at: Date | null, resigned_at: Date | null }>(
      `SELECT suspended_at, resigned_at FROM memberships WHERE id = $1`, [admin.memberId])
    expect(row).toEqual({ suspended_at: null, resigned_at: null })
    expect(await auditOf(admin.memberId)).toEqual([])
  })

  it('two admins suspending each other at once: exactly one goes through, and one admin keeps working', async () => {
    const [a, b] = await Promise.all([makeMember({ roles: ['admin'] }), makeMember({ roles: ['admin'] })])
    const [cookieA, cookieB] = await Promise.all([a!, b!].map(m => signIn(inject('baseUrl'), m.email, m.password)))
    const [byA, byB] = await Promise.all([
      post(b!.memberId, 'suspend', { reason: 'Suspended by the other admin' }, cookieA),
      post(a!.memberId, 'suspend', { reason: 'Suspended by the other admin' }, cookieB),
    ])
    const statuses = [byA.status, byB.status].sort()
    expect(statuses[0]).toBe(200)
    // The loser's request was refused either inside the race (403 or 422, checked under the lock) or,
    // arriving after the winner's commit, at the door: a suspension ends the member's sessions (401).
    expect([401, 403, 422]).toContain(statuses[1])
    const rows = await sql<{ id: string, suspended_at: Date | null }>(
      `SELECT id, suspended_at FROM memberships WHERE id = ANY($1::uuid[])`, [[a!.memberId, b!.memberId]])
    expect(rows.filter(r => r.suspended_at === null)).toHaveLength(1)
    const working = rows.find(r => r.suspended_at === null)!.id === a!.memberId ? cookieA : cookieB
    expect((await api('/api/members', { as: working })).status).toBe(200)
    const events = await sql(`SELECT id FROM audit_events WHERE action = 'member.suspend' AND subject_id = ANY($1::uuid[])`, [[a!.memberId, b!.memberId]])
    expect(events).toHaveLength(1)
  })
})

describe('database refusals never become a 500', () => {
  it('maps a constraint the database enforces on a membership action to 422 and writes nothing', async () => {
    const m = await makeMember()
    // A constraint for this one member only (NOT VALID: other rows are not checked), dropped afterwards.
    const name = `test_refuse_${m.memberId.replace(/-/g, '')}`
    await sql(`ALTER TABLE memberships ADD CONSTRAINT ${name} CHECK (id <> '${m.memberId}' OR suspended_at IS NULL) NOT VALID`)
    try {
      const res = await post(m.memberId, 'suspend', { reason: 'The database says no' })
      expect(res.status).toBe(422)
      expect(codeOf(res)).toEqual(['INVALID_RECORD'])
    }
    finally {
      await sql(`ALTER TABLE memberships DROP CONSTRAINT ${name}`)
    }
    expect(await auditOf(m.memberId)).toEqual([])
  })
})

describe('a junior\'s guardian and their consent', () => {
  const junior = (o: Parameters<typeof makeMember>[0] = {}) => makeMember({ birthDate: clubDay(-14 * 365), guardianName: 'Rowan Saltreed', ...o })

  it('re-sends a consent link on request (audited), and a new guardian e-mail stops the old link and asks the new guardian', async () => {
    const first = guardianAddress('first')
    const m = await junior({ guardianEmail: first })
    const resend = await post(m.memberId, 'guardian-consent', { reason: 'Guardian lost the first e-mail' })
    expect(resend.status).toBe(200)
    expect(resend.body).toMatchObject({ id: m.memberId, guardianEmail: first, guardianConsentAt: null })
    const oldToken = await tokenIn(first)

    const second = guardianAddress('second')
    const edit = await patch(m.memberId, { guardianName: 'Ash Saltreed', guardianEmail: second.toUpperCase(), reason: 'Guardian changed at the parents\' request' })
    expect(edit.status).toBe(200)
    expect(edit.body).toMatchObject({ guardianName: 'Ash Saltreed', guardianEmail: second, guardianConsentAt: null })
    const stale = await api('/api/guardian-consent', { body: { token: oldToken } })
    expect(stale.status).toBe(422)
    expect(codeOf(stale)).toEqual(['TOKEN_USED'])

    const mail = await waitForMail(second, CONSENT_SUBJECT)
    expect(mail.text).toContain('Hello Ash Saltreed')
    const link = linkIn(mail, '/guardian-consent')
    expect(link.origin).toBe(inject('baseUrl'))
    expect((await api('/api/guardian-consent', { body: { token: link.searchParams.get('token') } })).status).toBe(200)
    expect(await consentOf(m.memberId)).not.toBeNull()

    // One transaction writes the edit and the request, so only the requests' order is certain.
    const events = await auditOf(m.memberId)
    expect(events.map(e => e.action).sort()).toEqual(['member.edit', 'member.guardian_consent', 'member.guardian_consent_request', 'member.guardian_consent_request'])
    const requests = events.filter(e => e.action === 'member.guardian_consent_request')
    expect(requests[0]).toMatchObject({ reason: 'Guardian lost the first e-mail', after: { linksStopped: 0 } })
    expect(requests[1]).toMatchObject({ reason: 'Guardian changed at the parents\' request', after: { linksStopped: 1 } })
    expect(events.find(e => e.action === 'member.edit')).toMatchObject({
      reason: 'Guardian changed at the parents\' request',
      after: { changed: ['guardianName', 'guardianEmail'] },
    })
    // No guardian's name or e-mail in a row that can never be erased.
    const trail = JSON.stringify(events).toLowerCase()
    for (const value of [first, second, 'ash saltreed', 'rowan saltreed']) expect(trail).not.toContain(value.toLowerCase())
  })

  it('clears a given consent when the guardian e-mail changes, and keeps it when only other details change', async () => {
    const m = await junior({ guardianEmail: guardianAddress('kept'), guardianConsent: true })
    expect((await patch(m.memberId, { phone: '+44 1632 960456', guardianName: 'Rowan A. Saltreed' })).body.guardianConsentAt).not.toBeNull()
    const next = guardianAddress('new')
    const res = await patch(m.memberId, { guardianEmail: next })
    expect(res.status).toBe(200)
    expect(res.body.guardianConsentAt).toBeNull()
    expect(await consentOf(m.memberId)).toBeNull()
    await tokenIn(next)
    const edit = (await auditOf(m.memberId)).filter(e => e.action === 'member.edit')[1]!
    expect(edit.after).toEqual({ changed: ['guardianEmail', 'guardianConsentAt'] })
    // The reason is optional; without one the request says why it was sent.
    expect(edit.reason).toBeNull()
    const request = (await auditOf(m.memberId)).find(e => e.action === 'member.guardian_consent_request')!
    expect(request.reason).toMatch(/Guardian details changed/)
  })

  it('an adult made a junior by a corrected birth date names a guardian, who is asked for consent', async () => {
    const m = await makeMember()
    const birthDate = clubDay(-10 * 365)
    const bare = await patch(m.memberId, { birthDate })
    expect(bare.status).toBe(400)
    expect(Object.keys(bare.body.data.fields).sort()).toEqual(['guardianEmail', 'guardianName'])
    const own = await patch(m.memberId, { birthDate, guardianName: 'Rowan Saltreed', guardianEmail: m.email })
    expect(own.status).toBe(400)
    expect(own.body.data.fields.guardianEmail).toMatch(/own e-mail/)
    const [row] = await sql<{ birth_date: string }>(`SELECT to_char(birth_date, 'YYYY-MM-DD') AS birth_date FROM memberships WHERE id = $1`, [m.memberId])
    expect(row!.birth_date).toBe(clubDay(-30 * 365))
    expect(await auditOf(m.memberId)).toEqual([])

    const guardian = guardianAddress('late')
    const res = await patch(m.memberId, { birthDate, guardianName: 'Rowan Saltreed', guardianEmail: guardian })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ junior: true, guardianEmail: guardian })
    await tokenIn(guardian)
  })

  it('keeps a junior\'s guardian: clearing the e-mail is 400 and changes nothing', async () => {
    const guardian = guardianAddress('stays')
    const m = await junior({ guardianEmail: guardian, guardianConsent: true })
    const res = await patch(m.memberId, { guardianEmail: '' })
    expect(res.status).toBe(400)
    expect(res.body.data.fields.guardianEmail).toMatch(/guardian's e-mail/)
    expect(await consentOf(m.memberId)).not.toBeNull()
    // On an adult the guardian may go.
    const adult = await makeMember({ guardianName: 'Old Guardian', guardianEmail: guardianAddress('adult') })
    expect((await patch(adult.memberId, { guardianName: '', guardianEmail: '' })).status).toBe(200)
  })

  it.each([
    ['0000-01-01', /year/],
    ['1899-12-31', /year/],
    ['tomorrow', /future/],
  ])('refuses the birth date %s with 400, not 422 or 500', async (date, message) => {
    const m = await makeMember()
    const res = await patch(m.memberId, { birthDate: date === 'tomorrow' ? clubDay(1) : date })
    expect(res.status).toBe(400)
    expect(res.body.data.fields.birthDate).toMatch(message)
    expect(await auditOf(m.memberId)).toEqual([])
  })

  it.each([
    ['an adult', { guardianEmail: 'guardian-adult@test.hoopwise.example' }, 'NOT_JUNIOR'],
    ['a junior without a guardian e-mail', { birthDate: clubDay(-14 * 365) }, 'NO_GUARDIAN'],
    ['a junior whose guardian has consented', { birthDate: clubDay(-14 * 365), guardianEmail: 'guardian-done@test.hoopwise.example', guardianConsent: true }, 'ALREADY_CONSENTED'],
  ])('does not re-send a consent link for %s (422 %s)', async (_label, overrides, code) => {
    const m = await makeMember(overrides)
    const res = await post(m.memberId, 'guardian-consent', { reason: 'Asking once more' })
    expect(res.status).toBe(422)
    expect(codeOf(res)).toEqual([code])
    expect(await auditOf(m.memberId)).toEqual([])
  })

  it('skips the consent e-mails still queued for the old guardian when a new link is asked for or the guardian changes', async () => {
    const old = guardianAddress('queued')
    const m = await junior({ guardianEmail: old })
    // A consent e-mail waiting in the queue (due later, so no run sends it meanwhile), its link in the body.
    const waiting = async (subjectKey: string) => (await makeNotice({
      memberId: m.memberId, kind: 'guardian_consent', subjectKey, toEmail: old, subject: 'Consent asked (test)',
      textBody: 'Open /guardian-consent?token=waiting-token-1', htmlBody: '<a href="/guardian-consent?token=waiting-token-1">Consent</a>',
      nextAttemptAt: fromNow('1 hour'),
    })).noticeId
    const notice = (id: string) => sql<{ status: string, last_error: string | null, text_body: string, html_body: string }>(
      'SELECT status, last_error, text_body, html_body FROM notices WHERE id = $1', [id])

    const first = await waiting('test-first')
    expect((await post(m.memberId, 'guardian-consent', { reason: 'Asking once more' })).status).toBe(200)
    const [skipped] = await notice(first)
    expect(skipped).toMatchObject({ status: 'skipped', last_error: 'Replaced by a newer consent link' })
    expect(`${skipped!.text_body}${skipped!.html_body}`).not.toContain('waiting-token-1')
    // The fresh link itself goes out.
    await waitForMail(old, CONSENT_SUBJECT)

    const second = await waiting('test-second')
    expect((await patch(m.memberId, { guardianEmail: guardianAddress('next') })).status).toBe(200)
    expect((await notice(second))[0]).toMatchObject({ status: 'skipped', last_error: 'Replaced by a newer consent link' })
  })

  it('re-sending needs a reason and members.manage', async () => {
    const guardian = guardianAddress('gate')
    const m = await junior({ guardianEmail: guardian })
    expect((await post(m.memberId, 'guardian-consent', {})).status).toBe(400)
    expect((await post(m.memberId, 'guardian-consent', { reason: 'Not my call' }, 'safety')).status).toBe(403)
    expect(await mailsTo(guardian)).toEqual([])
    expect(await auditOf(m.memberId)).toEqual([])
  })
})

describe('a reason on a member edit', () => {
  it('lands in the audit trail; a reason alone is nothing to change', async () => {
    const m = await makeMember()
    const res = await patch(m.memberId, { emergencyContactName: 'Rhea Saltreed', reason: 'Asked at the spring launch' })
    expect(res.status).toBe(200)
    const [edit] = await auditOf(m.memberId)
    expect(edit).toMatchObject({ action: 'member.edit', reason: 'Asked at the spring launch', after: { changed: ['emergencyContactName'] } })
    const only = await patch(m.memberId, { reason: 'Nothing else' })
    expect(only.status).toBe(400)
  })
})
