import type { Transaction } from 'sequelize'
import { AuditEvent } from '../../models'
import type { Actor } from '../../utils/auth'
import type { AuditAction } from '#shared/utils/audit-actions'

/** What acts when no member does: the labels stored for rows without an actor id (never a person's name). */
export const NON_MEMBER_ACTORS = { system: 'System', guardian: 'Guardian (e-mailed link)' } as const
export type NonMemberActor = keyof typeof NON_MEMBER_ACTORS

export interface AuditEntry {
  /** One of AUDIT_ACTIONS (shared/utils/audit-actions.ts), which gives it its words on the audit page. */
  action: AuditAction
  subjectType: string
  subjectId: string | null
  /**
   * Before and after: ids, field names, statuses, roles, counts — never a name, an e-mail, a phone
   * number, a birth date or a guardian's details (the row can never be erased). For contact edits
   * record which fields changed (`changedFields`), not their values.
   */
  before?: Record<string, unknown> | null
  after?: Record<string, unknown> | null
  /** Officer-written free text; the forms ask for no personal details. */
  reason?: string | null
  /** Who acted when `actor` is null (default: the system). */
  by?: NonMemberActor
}

/**
 * Appends one event to the audit trail (who, what, when, before, after, why), inside `transaction`.
 * The actor is kept by membership id only; the trail shows their name as it is when read.
 */
export async function recordAudit(actor: Actor | null, clubId: string, entry: AuditEntry, transaction?: Transaction) {
  await AuditEvent.create({
    clubId,
    actorMembershipId: actor?.membership.id ?? null,
    actorName: actor ? null : NON_MEMBER_ACTORS[entry.by ?? 'system'],
    action: entry.action,
    subjectType: entry.subjectType,
    subjectId: entry.subjectId,
    before: entry.before ?? null,
    after: entry.after ?? null,
    reason: entry.reason ?? null,
  }, { transaction })
}

/** The audit `after` of a contact edit: which fields changed, never their values. */
export function changedFields(fields: Iterable<string>): { changed: string[] } {
  return { changed: [...fields] }
}
