import { describe, expect, it } from 'vitest'
import { api } from '../support/http'
import { sql } from '../support/db'
import { makeMember } from '../support/factories'
import { AUDIT_ACTIONS, AUDIT_ACTION_WORDS, isAuditAction } from '../../shared/utils/audit-actions'
import { FIELD_LABELS } from '../../shared/utils/field-labels'
import type { AuditEventDto, Paged } from '../../shared/types/dto'

// Rows the tests write straight into the table (to test its triggers and grants) carry the subject
// type 'test'; every other row was written by the server.
const SERVER_ROWS = `subject_type <> 'test'`

describe('the audit route\'s action filter is the list of actions', () => {
  it.each(AUDIT_ACTIONS)('accepts %s and returns only that action', async (action) => {
    const res = await api<Paged<AuditEventDto>>('/api/audit', { as: 'admin', query: { action, pageSize: 100 } })
    expect(res.status).toBe(200)
    expect(res.body.items.filter(e => e.action !== action)).toEqual([])
  })

  it.each(['member.delete', 'member', 'test.append_only', 'MEMBER.SUSPEND', 'member.suspend.extra'])('refuses %s with 400', async (action) => {
    const res = await api('/api/audit', { as: 'admin', query: { action } })
    expect(res.status).toBe(400)
    expect(res.body.data.fields.action).toBe('Not an action the audit trail records')
  })
})

describe('what the server records is in the list, and in words', () => {
  it('a member\'s whole story records only listed actions, whose fields all have words', async () => {
    const m = await makeMember({ paidDays: null, approved: false })
    const post = (verb: string) => api(`/api/members/${m.memberId}/${verb}`, { method: 'POST', as: 'admin', body: { reason: `Words test: ${verb}` } })
    for (const verb of ['approve', 'suspend', 'reinstate', 'resign', 'rejoin']) expect((await post(verb)).status, verb).toBe(200)
    expect((await api(`/api/members/${m.memberId}/roles`, { method: 'PUT', as: 'admin', body: { roles: ['member', 'instructor'], reason: 'Words test: roles' } })).status).toBe(200)
    expect((await api(`/api/members/${m.memberId}`, { method: 'PATCH', as: 'admin', body: { name: `${m.name} Jr`, phone: '+44 1632 960123' } })).status).toBe(200)

    const trail = await api<Paged<AuditEventDto>>('/api/audit', { as: 'admin', query: { subjectId: m.memberId, pageSize: 100 } })
    expect(trail.body.items.map(e => e.action).sort()).toEqual(
      ['member.approve', 'member.edit', 'member.reinstate', 'member.rejoin', 'member.rename', 'member.resign', 'member.roles', 'member.suspend'])
    for (const e of trail.body.items) {
      expect(isAuditAction(e.action), e.action).toBe(true)
      const fields = [...Object.keys(e.before ?? {}), ...Object.keys(e.after ?? {})].filter(f => f !== 'changed')
      const changed = Array.isArray(e.after?.changed) ? e.after.changed as string[] : []
      expect([...fields, ...changed].filter(f => !FIELD_LABELS[f]), e.action).toEqual([])
    }
  })

  it('every action stored by the server (by every test so far) is in the list', async () => {
    const rows = await sql<{ action: string }>(`SELECT DISTINCT action FROM audit_events WHERE ${SERVER_ROWS}`)
    // The test above leaves at least these, so the check below reads real rows.
    expect(rows.map(r => r.action)).toEqual(expect.arrayContaining(['member.suspend', 'member.approve']))
    expect(rows.map(r => r.action).filter(a => !isAuditAction(a))).toEqual([])
    expect(rows.every(r => AUDIT_ACTION_WORDS[r.action as keyof typeof AUDIT_ACTION_WORDS].label)).toBe(true)
  })

  it('every before/after field stored by the server has words', async () => {
    const rows = await sql<{ field: string }>(`
      SELECT DISTINCT f AS field FROM audit_events,
        LATERAL (SELECT jsonb_object_keys(coalesce(before, '{}'::jsonb)) UNION SELECT jsonb_object_keys(coalesce(after, '{}'::jsonb))) AS k(f)
      WHERE ${SERVER_ROWS}
      UNION SELECT DISTINCT jsonb_array_elements_text(after->'changed') FROM audit_events
      WHERE ${SERVER_ROWS} AND jsonb_typeof(after->'changed') = 'array'`)
    const fields = rows.map(r => r.field).filter(f => f !== 'changed')
    expect(fields).toEqual(expect.arrayContaining(['status', 'roles']))
    expect(fields.filter(f => !FIELD_LABELS[f]).sort()).toEqual([])
  })
})
