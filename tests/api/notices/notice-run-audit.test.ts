import { describe, it, expect } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { demoClubId } from '../../support/factories'

describe('POST /api/outbox/run', () => {
  it('records who sent the due e-mails now, and what the run did, in the audit trail', async () => {
    const clubId = await demoClubId()
    const [{ since } = { since: new Date(0) }] = await sql<{ since: Date }>('SELECT now() AS since')
    const run = await api('/api/outbox/run', { method: 'POST', as: 'admin' })
    expect(run.status).toBe(200)

    const rows = await sql<{ actor_membership_id: string | null, subject_id: string, after: Record<string, unknown> }>(
      `SELECT actor_membership_id, subject_id, after FROM audit_events
       WHERE action = 'notice.run' AND club_id = $1 AND created_at >= $2`, [clubId, since])
    const [admin] = await sql<{ id: string }>(`SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE u.email = 'admin@hoopwise.example' AND m.club_id = $1`, [clubId])
    // Other files may run the job at the same time: this run's row is the one with the admin as actor and its counts.
    expect(rows.filter(r => r.actor_membership_id === admin!.id)).toContainEqual({
      actor_membership_id: admin!.id,
      subject_id: clubId,
      after: { outcome: 'done', ...run.body },
    })

    const trail = await api<{ items: { action: string }[] }>('/api/audit', { as: 'admin', query: { action: 'notice.run' } })
    expect(trail.status).toBe(200)
    expect(trail.body.items.length).toBeGreaterThan(0)
  })
})
