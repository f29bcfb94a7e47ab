import { describe, expect, it } from 'vitest'
import pg from 'pg'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeAuditEvent, makeMember } from '../../support/factories'
import { testEnv } from '../../support/test-env'
import type { AuditEventDto, Paged } from '../../../shared/types/dto'

describe('the audit trail is append-only in the database', () => {
  it('refuses plain SQL UPDATE, DELETE and TRUNCATE, leaving the row as it was', async () => {
    const { auditId: id } = await makeAuditEvent({ actorName: 'Trigger test', action: 'test.append_only', reason: 'original' })
    await expect(sql(`UPDATE audit_events SET reason = 'rewritten' WHERE id = $1`, [id])).rejects.toThrow(/append-only: UPDATE refused/)
    await expect(sql(`DELETE FROM audit_events WHERE id = $1`, [id])).rejects.toThrow(/append-only: DELETE refused/)
    // TRUNCATE inside a transaction that is rolled back whatever happens, so other files' rows are safe.
    const client = new pg.Client({ connectionString: testEnv.databaseUrl })
    await client.connect()
    try {
      await client.query('BEGIN')
      await expect(client.query('TRUNCATE audit_events')).rejects.toThrow(/append-only: TRUNCATE refused/)
    }
    finally {
      await client.query('ROLLBACK')
      await client.end()
    }
    const [after] = await sql<{ reason: string, action: string }>(`SELECT reason, action FROM audit_events WHERE id = $1`, [id])
    expect(after).toEqual({ reason: 'original', action: 'test.append_only' })
  })
})

describe('GET /api/audit', () => {
  it('pages the events newest first and filters by action and subject', async () => {
    const m = await makeMember()
    const act = (action: string, reason: string) => api(`/api/members/${m.memberId}/${action}`, { method: 'POST', as: 'admin', body: { reason } })
    expect((await act('suspend', 'First reason')).status).toBe(200)
    expect((await act('reinstate', 'Second reason')).status).toBe(200)
    expect((await act('suspend', 'Third reason')).status).toBe(200)

    const res = await api<Paged<AuditEventDto>>('/api/audit', { as: 'safety', query: { subjectId: m.memberId } })
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(3)
    expect(res.body.items.map(e => e.reason)).toEqual(['Third reason', 'Second reason', 'First reason'])
    expect(res.body.items[0]).toMatchObject({
      actorName: 'Anselm Brackwater',
      action: 'member.suspend',
      subjectType: 'membership',
      subjectId: m.memberId,
      subjectName: m.name,
      before: { status: 'active' },
      after: { status: 'suspended' },
    })
    const times = res.body.items.map(e => e.createdAt)
    expect(times).toEqual([...times].sort().reverse())

    const suspensions = await api<Paged<AuditEventDto>>('/api/audit', { as: 'admin', query: { subjectId: m.memberId, action: 'member.suspend' } })
    expect(suspensions.body.items.map(e => e.reason)).toEqual(['Third reason', 'First reason'])

    const second = await api<Paged<AuditEventDto>>('/api/audit', { as: 'admin', query: { subjectId: m.memberId, pageSize: 1, page: 2 } })
    expect(second.body).toMatchObject({ total: 3, page: 2, pageSize: 1 })
    expect(second.body.items.map(e => e.reason)).toEqual(['Second reason'])

    const all = await api<Paged<AuditEventDto>>('/api/audit', { as: 'admin', query: { action: 'member.reinstate', pageSize: 100 } })
    expect(all.body.items.every(e => e.action === 'member.reinstate')).toBe(true)
    expect(all.body.items.some(e => e.subjectId === m.memberId)).toBe(true)
  })

  it('is for audit.read only', async () => {
    expect((await api('/api/audit')).status).toBe(401)
    expect((await api('/api/audit', { as: 'member' })).status).toBe(403)
    expect((await api('/api/audit', { as: 'instructor' })).status).toBe(403)
    expect((await api('/api/audit', { as: 'admin' })).status).toBe(200)
  })

  it.each([
    [{ subjectId: 'nope' }, 'subjectId'],
    [{ action: 'DROP TABLE' }, 'action'],
    [{ pageSize: 101 }, 'pageSize'],
  ])('refuses %o with 400', async (query, field) => {
    const res = await api('/api/audit', { as: 'admin', query })
    expect(res.status).toBe(400)
    expect(res.body.data.fields[field]).toBeTruthy()
  })
})
