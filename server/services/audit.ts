import type { Transaction } from 'sequelize'
import { AuditEvent } from '../models'
import type { Actor } from '../utils/auth'

export interface AuditEntry {
  action: string
  subjectType: string
  subjectId: string | null
  before?: Record<string, unknown> | null
  after?: Record<string, unknown> | null
  reason?: string | null
}

/** Appends one event to the audit trail (who, what, when, before, after, why), inside `transaction`. */
export async function recordAudit(actor: Actor | null, clubId: string, entry: AuditEntry, transaction?: Transaction) {
  await AuditEvent.create({
    clubId,
    actorMembershipId: actor?.membership.id ?? null,
    actorName: actor?.user.name ?? 'System',
    action: entry.action,
    subjectType: entry.subjectType,
    subjectId: entry.subjectId,
    before: entry.before ?? null,
    after: entry.after ?? null,
    reason: entry.reason ?? null,
  }, { transaction })
}
