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
  'membership.signed_up': 'Signed up',
  'membership.guardian_consent': 'Guardian gave consent',
  'account.password_reset': 'Reset a password from an e-mailed link',
  'waiver.publish': 'Published a waiver version',
  'notice.retry': 'Retried a notice',
  'membership.admin_created': 'Admin created from the command line',
  'notice.run': 'Sent due e-mails now',
}

/** The label for `action`, or the action code itself when it has none. */
export function auditActionLabel(action: string): string {
  return AUDIT_ACTION_LABELS[action] ?? action
}
