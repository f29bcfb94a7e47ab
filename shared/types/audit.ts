/** The audit trail. Plain objects the routes return, never model instances. */

export interface AuditEventDto {
  id: string
  /** The acting membership (null for the system or a guardian's e-mailed link). */
  actorId?: string | null
  /** The actor's name as it is now (or the fixed label of a non-member actor). */
  actorName: string
  action: string
  subjectType: string
  subjectId: string | null
  /** A readable name for the subject (the member's name for a membership), when there is one. */
  subjectName?: string | null
  before: Record<string, unknown> | null
  after: Record<string, unknown> | null
  reason: string | null
  createdAt: string
}
