/**
 * Readable labels for audit-trail actions (`area.verb`), for the audit page. Each capability that
 * records audit events appends its actions here; an action without a label shows its code.
 */
export const AUDIT_ACTION_LABELS: Record<string, string> = {
  'member.approve': 'Approved a sign-up',
  'member.suspend': 'Suspended a membership',
  'member.reinstate': 'Reinstated a membership',
  'member.resign': 'Marked a membership resigned',
  'member.rejoin': 'Let a member rejoin',
  'member.edit': 'Edited member details',
  'member.roles': 'Changed roles',
  'member.guardian_consent_request': 'Asked a guardian for consent',
  'member.rename': 'Changed a name',
  'member.signed_up': 'Signed up',
  'member.guardian_consent': 'Guardian gave consent',
  'account.password_reset': 'Reset a password from an e-mailed link',
  'waiver.publish': 'Published a waiver version',
  'notice.retry': 'Retried a notice',
  'member.admin_created': 'Admin created from the command line',
  'notice.run': 'Sent due e-mails now',
}

/** The label for `action`, or the action code itself when it has none. */
export function auditActionLabel(action: string): string {
  return AUDIT_ACTION_LABELS[action] ?? action
}

/**
 * Readable names of the fields an audit event says changed (`after.changed`), for the audit page.
 * Contact edits record only which fields changed, never their values.
 */
export const AUDIT_FIELD_LABELS: Record<string, string> = {
  name: 'Name',
  phone: 'Phone',
  emergencyContactName: 'Emergency contact',
  emergencyContactPhone: 'Emergency phone',
  unitPreference: 'Units',
  birthDate: 'Birth date',
  guardianName: 'Guardian\'s name',
  guardianEmail: 'Guardian\'s e-mail',
  guardianConsentAt: 'Guardian consent',
}

/** "Phone, Emergency contact changed" for `fields` (a field without a label shows its code). */
export function changedFieldsText(fields: readonly string[]): string {
  if (!fields.length) return 'Nothing changed'
  const labels = [...new Set(fields.map(f => AUDIT_FIELD_LABELS[f] ?? f))]
  return `${labels.join(', ')} changed`
}

/** The field names an audit event's `after` says changed (`{ changed: [...] }`), or null when it records values. */
export function changedFieldsOf(after: Record<string, unknown> | null): string[] | null {
  const changed = after?.changed
  return Array.isArray(changed) && changed.every(f => typeof f === 'string') ? changed as string[] : null
}
