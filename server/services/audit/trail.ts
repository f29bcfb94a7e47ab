import { QueryTypes } from 'sequelize'
import type { AuditQuery } from '#shared/schemas/audit'
import type { AuditEventDto } from '#shared/types/audit'
import type { Paged } from '#shared/types/common'

interface AuditRow {
  id: string
  actor_id: string | null
  actor_name: string | null
  action: string
  subject_type: string
  subject_id: string | null
  subject_name: string | null
  before: Record<string, unknown> | null
  after: Record<string, unknown> | null
  reason: string | null
  created_at: Date
}

/**
 * One page of club `clubId`'s audit trail, newest first (id breaks ties), optionally only one action,
 * one kind of subject and/or one subject. A COUNT and a page query on the (club_id, created_at) index. The actor is
 * named by their CURRENT name (so a borrowed name never hides who acted).
 */
export async function listAuditEvents(clubId: string, query: AuditQuery): Promise<Paged<AuditEventDto>> {
  const bind: Record<string, unknown> = { clubId }
  const where = ['a.club_id = $clubId']
  if (query.action) {
    where.push('a.action = $action')
    bind.action = query.action
  }
  if (query.subjectType) {
    where.push('a.subject_type = $subjectType')
    bind.subjectType = query.subjectType
  }
  if (query.subjectId) {
    where.push('a.subject_id = $subjectId')
    bind.subjectId = query.subjectId
  }
  const db = useDb()
  const [counted] = await db.query<{ total: number }>(
    `SELECT count(*)::int AS total FROM audit_events a WHERE ${where.join(' AND ')}`, { bind, type: QueryTypes.SELECT })
  const total = counted?.total ?? 0
  const offset = (query.page - 1) * query.pageSize
  const rows = offset >= total
    ? []
    : await db.query<AuditRow>(`
      SELECT a.id, a.actor_membership_id AS actor_id, coalesce(au.name, a.actor_name) AS actor_name, a.action,
             a.subject_type, a.subject_id, u.name AS subject_name, a.before, a.after, a.reason, a.created_at
      FROM audit_events a
      LEFT JOIN memberships m ON a.subject_type = 'membership' AND m.id = a.subject_id AND m.club_id = a.club_id
      LEFT JOIN users u ON u.id = m.user_id
      -- The actor's name as it is now, never as it was written: a row keeps only the actor's id.
      LEFT JOIN memberships am ON am.id = a.actor_membership_id
      LEFT JOIN users au ON au.id = am.user_id
      WHERE ${where.join(' AND ')}
      ORDER BY a.created_at DESC, a.id DESC
      LIMIT $limit OFFSET $offset`, { bind: { ...bind, limit: query.pageSize, offset }, type: QueryTypes.SELECT })
  return {
    items: rows.map(r => ({
      id: r.id,
      actorId: r.actor_id,
      actorName: r.actor_name ?? 'System',
      action: r.action,
      subjectType: r.subject_type,
      subjectId: r.subject_id,
      subjectName: r.subject_name,
      before: r.before,
      after: r.after,
      reason: r.reason,
      createdAt: new Date(r.created_at).toISOString(),
    })),
    page: query.page,
    pageSize: query.pageSize,
    total,
  }
}
