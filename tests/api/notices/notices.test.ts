import { describe, it, expect, inject } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { sql } from '../../support/db'
import { makeMember, makeNotice, setMembership, clubDay, type MadeMember, type NoticeOverrides } from '../../support/factories'
import { mailsTo, waitForMail, linkIn, type CaughtMail } from '../../support/mail'
import { testEnv } from '../../support/test-env'
import { deriveOptOutKey, optOutToken } from '../../../server/services/notices/opt-out'

const REMINDER = /dues run out/

interface NoticeRow { id: string, membership_id: string, status: string, due_on: string, subject_key: string, attempts: number }

async function remindersOf(members: MadeMember[]): Promise<NoticeRow[]> {
  return sql<NoticeRow>(`SELECT id, membership_id, status, due_on::text AS due_on, subject_key, attempts FROM notices
    WHERE kind = 'dues_reminder' AND membership_id = ANY ($1::uuid[]) ORDER BY membership_id, due_on`, [members.map(m => m.memberId)])
}

/** Polls `check` until it returns a truthy value (another test's queue run may still be sending). */
async function eventually<T>(check: () => Promise<T | null | undefined | false>, timeoutMs = 15_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = await check()
    if (value) return value
    if (Date.now() > deadline) throw new Error('condition not met in time')
    await new Promise(r => setTimeout(r, 200))
  }
}

/** The message's header lines as the catcher received them (its JSON leaves structured headers out). */
async function rawHeaders(mail: CaughtMail): Promise<Record<string, string>> {
  const source = await (await fetch(`${testEnv.mailUrl}/api/email/${mail.id}/source`)).text()
  const head = source.split(/\r?\n\r?\n/)[0]!.replace(/\r?\n(?=[ \t])/g, '')
  return Object.fromEntries(head.split(/\r?\n/).map((line) => {
    const at = line.indexOf(':')
    return [line.slice(0, at).trim().toLowerCase(), line.slice(at + 1).trim()]
  }))
}

const settle = () => new Promise(r => setTimeout(r, 700))
const run = () => api('/api/outbox/run', { method: 'POST', as: 'admin' })
const reminderMails = async (m: MadeMember): Promise<CaughtMail[]> => (await mailsTo(m.email)).filter(x => REMINDER.test(x.subject))

async function queuedNotice(member: MadeMember, fields: Pick<NoticeOverrides, 'status' | 'subjectKey' | 'attempts' | 'lastError'> = {}) {
  const { noticeId } = await makeNotice({ memberId: member.memberId, subject: 'Your test dues run out soon', ...fields })
  return noticeId
}

describe('the notice job', () => {
  it('queues and sends one dues reminder per member and period, even when two runs race', async () => {
    const members = await Promise.all([1, 2, 3].map(() => makeMember({ paidDays: 10 })))
    const [first, second] = await Promise.all([run(), run()])
    expect(first.status).toBe(200)
    expect(second.status).toBe(200)
    expect(first.body).toEqual(expect.objectContaining({ queued: expect.any(Number), sent: expect.any(Number), retried: 0 }))

    const rows = await remindersOf(members)
    expect(rows).toHaveLength(3)
    for (const row of rows) {
      expect(row.due_on).toBe(clubDay(-20)) // paid-through minus 30 days: one per dues period
      expect(row.subject_key).toBe(clubDay(10))
    }
    await eventually(async () => (await remindersOf(members)).every(r => r.status === 'sent'))
    for (const m of members) await waitForMail(m.email, REMINDER)
    await settle()
    for (const m of members) expect(await reminderMails(m)).toHaveLength(1)

    // A third run finds nothing new for them.
    expect((await run()).status).toBe(200)
    await settle()
    expect(await remindersOf(members)).toHaveLength(3)
    for (const m of members) expect(await reminderMails(m)).toHaveLength(1)
  })

  it('leaves out suspended, resigned and well-paid members', async () => {
    const members = await Promise.all([
      makeMember({ paidDays: 5, suspendedReason: 'Test suspension' }),
      makeMember({ paidDays: 5, resigned: true }),
      makeMember({ paidDays: 45 }),
      makeMember({ paidDays: -3 }),
    ])
    expect((await run()).status).toBe(200)
    expect(await remindersOf(members)).toEqual([])
  })

  it('skips a queued notice when the member opted out before it was sent', async () => {
    const member = await makeMember()
    // Opted out first, then the row goes in: a background run kicked by another file could otherwise
    // take the notice in between and rightly send it.
    await setMembership(member.memberId, { noticeOptOuts: ['dues_reminder'] })
    const id = await queuedNotice(member)
    expect((await run()).status).toBe(200)
    const [row] = await eventually(async () => {
      const rows = await sql<{ status: string, last_error: string }>('SELECT status, last_error FROM notices WHERE id = $1', [id])
      return rows[0]?.status === 'skipped' && rows
    })
    expect(row!.last_error).toMatch(/opted out/)
    expect(await mailsTo(member.email)).toEqual([])
  })
})

describe('opting out', () => {
  it('works from the reminder without signing in, and the next period is not queued', async () => {
    const [optOut, control] = await Promise.all([makeMember({ paidDays: 12 }), makeMember({ paidDays: 12 })])
    expect((await run()).status).toBe(200)
    const mail = await waitForMail(optOut.email, REMINDER)
    const link = linkIn(mail, '/opt-out')
    expect(link.origin).toBe(new URL(inject('baseUrl')).origin)
    expect(mail.html).toContain('/opt-out?token=')
    const token = link.searchParams.get('token')!

    const preview = await api('/api/notices/opt-out', { query: { token } })
    expect(preview.status).toBe(200)
    expect(preview.body).toEqual(expect.objectContaining({ kind: 'dues_reminder', optional: true, optedOut: false }))

    const done = await api('/api/notices/opt-out', { method: 'POST', body: { token } })
    expect(done.status).toBe(200)
    expect(done.body).toEqual(expect.objectContaining({ kind: 'dues_reminder', optedOut: true }))
    expect((await api('/api/notices/opt-out', { method: 'POST', body: { token } })).status).toBe(200) // idempotent
    const [m] = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [optOut.memberId])
    expect(m!.notice_opt_outs).toEqual(['dues_reminder'])

    // They renew; the next period's reminder comes round: only the member who did not opt out gets it.
    await setMembership([optOut.memberId, control.memberId], { paidThrough: clubDay(25) })
    expect((await run()).status).toBe(200)
    expect(await remindersOf([optOut])).toHaveLength(1)
    const controlRows = await remindersOf([control])
    expect(controlRows.map(r => r.due_on)).toEqual([clubDay(-18), clubDay(-5)])
  })

  it('offers one-click opt-out headers that mail programs can POST to', async () => {
    const member = await makeMember({ paidDays: 14 })
    expect((await run()).status).toBe(200)
    const mail = await waitForMail(member.email, REMINDER)
    const headers = await rawHeaders(mail)
    expect(headers['list-unsubscribe-post']).toBe('List-Unsubscribe=One-Click')
    const url = headers['list-unsubscribe']!.replace(/^<|>$|\s+/g, '')
    expect(url.startsWith(`${inject('baseUrl')}/api/notices/opt-out?token=`)).toBe(true)
    const res = await fetch(url, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'List-Unsubscribe=One-Click' })
    expect(res.status).toBe(200)
    const [m] = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(m!.notice_opt_outs).toEqual(['dues_reminder'])
  })

  it('refuses safety kinds (422) and bad links (400/404)', async () => {
    const member = await makeMember()
    const safety = optOutToken(deriveOptOutKey(testEnv.sessionPassword), member.memberId, 'password_reset')
    const preview = await api('/api/notices/opt-out', { query: { token: safety } })
    expect(preview.status).toBe(200)
    expect(preview.body.optional).toBe(false)
    const refused = await api('/api/notices/opt-out', { method: 'POST', body: { token: safety } })
    expect(refused.status).toBe(422)
    expect(refused.body.data.reasons[0].code).toBe('NOT_OPTIONAL')

    const good = optOutToken(deriveOptOutKey(testEnv.sessionPassword), member.memberId, 'dues_reminder')
    const forged = optOutToken('not-the-server-secret-not-the-server-secret', member.memberId, 'dues_reminder')
    const otherMember = good.replace(member.memberId, '00000000-0000-4000-8000-000000000000')
    const unknownMember = optOutToken(deriveOptOutKey(testEnv.sessionPassword), '00000000-0000-4000-8000-000000000000', 'dues_reminder')
    for (const token of [forged, otherMember, unknownMember, good.slice(0, -3)]) {
      expect((await api('/api/notices/opt-out', { method: 'POST', body: { token } })).status).toBe(404)
    }
    expect((await api('/api/notices/opt-out', { method: 'POST', body: { token: 'short' } })).status).toBe(400)
    expect((await api('/api/notices/opt-out', { method: 'POST', body: {} })).status).toBe(400)
    expect((await api('/api/notices/opt-out', { method: 'POST', body: '{"token":' })).status).toBe(400)
    const [m] = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(m!.notice_opt_outs).toEqual([])
  })
})

describe('the outbox', () => {
  it('pages and filters on the server, for admins only', async () => {
    const members = await Promise.all([1, 2, 3].map(() => makeMember({ paidDays: 8 })))
    expect((await run()).status).toBe(200)
    await eventually(async () => (await remindersOf(members)).every(r => r.status === 'sent'))

    const query = { kind: 'dues_reminder', status: 'sent', pageSize: 2 }
    const page1 = await api('/api/outbox', { as: 'admin', query: { ...query, page: 1 } })
    expect(page1.status).toBe(200)
    expect(page1.body.items).toHaveLength(2)
    expect(page1.body.total).toBeGreaterThanOrEqual(3)
    expect(page1.body).toEqual(expect.objectContaining({ page: 1, pageSize: 2, timeZone: 'Europe/London' }))
    expect(page1.body.kinds).toEqual(expect.arrayContaining([{ kind: 'dues_reminder', label: 'Dues renewal reminder' }]))
    const page2 = await api('/api/outbox', { as: 'admin', query: { ...query, page: 2 } })
    expect(page2.status).toBe(200)
    const ids1 = page1.body.items.map((n: { id: string }) => n.id)
    for (const n of page2.body.items) expect(ids1).not.toContain(n.id)
    for (const n of [...page1.body.items, ...page2.body.items]) {
      expect(n).toEqual(expect.objectContaining({ kind: 'dues_reminder', kindLabel: 'Dues renewal reminder', status: 'sent', lastError: null }))
      expect(n.sentAt).toEqual(expect.any(String))
    }
    expect(Date.parse(page1.body.items[0].createdAt)).toBeGreaterThanOrEqual(Date.parse(page1.body.items[1].createdAt))
    // Internal columns stay in the database.
    const keys = Object.keys(page1.body.items[0])
    for (const internal of ['textBody', 'htmlBody', 'lockedUntil', 'claimId', 'clubId']) expect(keys).not.toContain(internal)

    const mine = await api('/api/outbox', { as: 'admin', query: { kind: 'dues_reminder', pageSize: 100 } })
    const names = mine.body.items.map((n: { memberName: string }) => n.memberName)
    expect(names).toEqual(expect.arrayContaining(members.map(m => m.name)))

    for (const bad of [{ status: 'lost' }, { pageSize: 1000 }, { page: 0 }, { kind: 'Dues-Reminder' }]) {
      expect((await api('/api/outbox', { as: 'admin', query: bad })).status).toBe(400)
    }
    for (const as of ['member', 'instructor', 'safety'] as const) {
      expect((await api('/api/outbox', { as })).status).toBe(403)
      expect((await api('/api/outbox/run', { method: 'POST', as })).status).toBe(403)
    }
    expect((await api('/api/outbox')).status).toBe(401)
    expect((await api('/api/outbox/run', { method: 'POST' })).status).toBe(401)
  })

  it('retries a failed notice, never a sent one', async () => {
    const member = await makeMember()
    const failed = await queuedNotice(member, { status: 'failed', attempts: 10, lastError: '550 No such mailbox (test)' })
    const listed = await api('/api/outbox', { as: 'admin', query: { status: 'failed', pageSize: 100 } })
    expect(listed.body.items.find((n: { id: string }) => n.id === failed)).toEqual(expect.objectContaining({
      status: 'failed', attempts: 10, lastError: '550 No such mailbox (test)',
    }))

    const retried = await api(`/api/outbox/${failed}/retry`, { method: 'POST', as: 'admin' })
    expect(retried.status).toBe(200)
    expect(retried.body).toEqual(expect.objectContaining({ id: failed, status: 'queued' }))
    const [audit] = await sql<{ action: string, before: { status: string } }>(
      `SELECT action, before FROM audit_events WHERE subject_id = $1`, [failed])
    expect(audit).toEqual(expect.objectContaining({ action: 'notice.retry', before: expect.objectContaining({ status: 'failed' }) }))

    // Back in the queue, it goes out (the retry starts a queue run by itself).
    await eventually(async () => (await sql<{ status: string }>('SELECT status FROM notices WHERE id = $1', [failed]))[0]?.status === 'sent')
    await waitForMail(member.email, /test dues/)

    const again = await api(`/api/outbox/${failed}/retry`, { method: 'POST', as: 'admin' })
    expect(again.status).toBe(409)
    expect((await api('/api/outbox/00000000-0000-4000-8000-000000000000/retry', { method: 'POST', as: 'admin' })).status).toBe(404)
    expect((await api('/api/outbox/not-a-uuid/retry', { method: 'POST', as: 'admin' })).status).toBe(404)
    expect((await api(`/api/outbox/${failed}/retry`, { method: 'POST', as: 'member' })).status).toBe(403)
    expect((await api(`/api/outbox/${failed}/retry`, { method: 'POST' })).status).toBe(401)
  })
})

describe('notices with a one-time link', () => {
  it('cannot be retried once failed: the link was removed, the member asks for a new one (422)', async () => {
    const member = await makeMember()
    const { noticeId } = await makeNotice({
      memberId: member.memberId, kind: 'password_reset', subject: 'Reset (test)', textBody: 'token=removed', htmlBody: 'token=removed',
      status: 'failed', attempts: 10,
    })
    const row = { id: noticeId }
    const res = await api(`/api/outbox/${row!.id}/retry`, { method: 'POST', as: 'admin' })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons[0].code).toBe('LINK_REMOVED')
    expect((await sql<{ status: string }>('SELECT status FROM notices WHERE id = $1', [row!.id]))[0]!.status).toBe('failed')
  })
})

describe('my e-mail settings', () => {
  it('lets a member switch optional e-mails off and on, never safety ones', async () => {
    const member = await makeMember()
    const login = await api('/api/auth/login', { body: { email: member.email, password: member.password } })
    const cookie = sessionCookieOf(login)

    const initial = await api('/api/me/notice-settings', { as: cookie })
    expect(initial.status).toBe(200)
    expect(initial.body.kinds).toEqual(expect.arrayContaining([expect.objectContaining({ kind: 'dues_reminder', enabled: true })]))
    expect(initial.body.kinds.map((k: { kind: string }) => k.kind)).not.toContain('password_reset')

    const off = await api('/api/me/notice-settings', { method: 'PUT', as: cookie, body: { optOuts: ['dues_reminder'] } })
    expect(off.status).toBe(200)
    expect(off.body.kinds.find((k: { kind: string }) => k.kind === 'dues_reminder').enabled).toBe(false)
    const [m] = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(m!.notice_opt_outs).toEqual(['dues_reminder'])

    const safety = await api('/api/me/notice-settings', { method: 'PUT', as: cookie, body: { optOuts: ['password_reset'] } })
    expect(safety.status).toBe(422)
    expect(safety.body.data.reasons[0].code).toBe('NOT_OPTIONAL')
    for (const body of [{ optOuts: ['no_such_kind'] }, { optOuts: 'dues_reminder' }, {}, '{"optOuts":']) {
      expect((await api('/api/me/notice-settings', { method: 'PUT', as: cookie, body })).status).toBe(400)
    }

    const on = await api('/api/me/notice-settings', { method: 'PUT', as: cookie, body: { optOuts: [] } })
    expect(on.body.kinds.find((k: { kind: string }) => k.kind === 'dues_reminder').enabled).toBe(true)
    const [after] = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(after!.notice_opt_outs).toEqual([])

    expect((await api('/api/me/notice-settings')).status).toBe(401)
    expect((await api('/api/me/notice-settings', { method: 'PUT', body: { optOuts: [] } })).status).toBe(401)
  })
})
