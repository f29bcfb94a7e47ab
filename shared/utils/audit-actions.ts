/**
 * The audit trail's actions (`area.verb`): the one list of what the server may record, each with its
 * words for the audit page. `recordAudit` takes an `AuditAction`, so an action missing here does not
 * compile; the audit route's filter accepts exactly this list. The app never rewrites a row (only the
 * owner's migration 0012 once renamed three `membership.` actions to `member.`), so an action stays
 * here once recorded.
 */
import { formatCalendarDate, formatInstant } from './dates'
import { fieldLabel } from './field-labels'
import { MEMBERSHIP_STATUS_WORDS, type MembershipStatus } from './membership-status'
import { NOTICE_STATUS_WORDS, type NoticeStatus } from './notice-status'
import { ROLE_LABELS, type Role } from './permissions'
import type { Words } from './words'

export const AUDIT_ACTIONS = [
  'member.approve',
  'member.suspend',
  'member.reinstate',
  'member.resign',
  'member.rejoin',
  'member.edit',
  'member.roles',
  'member.guardian_consent_request',
  'member.rename',
  'member.signed_up',
  'member.guardian_consent',
  'member.admin_created',
  'member.welcome',
  'account.password_reset',
  'waiver.publish',
  'notice.retry',
  'notice.run',
  'vessel.proof_test',
  'vessel.report',
  'vessel.quarantine',
  'vessel.release',
  'vessel.retire',
  'policy.vessels',
  'training.course',
  'training.session',
  'training.issue',
  'training.retraining',
  'training.record_elsewhere',
  'training.record_confirm',
  'training.record_reject',
  'station.create',
  'station.update',
  'booking.cancel',
  'dues.offline_payment',
  'dues.refund',
  'dues.member_plan',
  'dues.plan_edit',
  'policy.tiers',
  'tier.grant',
  'tier.renew',
  'tier.initial',
  'tier.suspend',
  'tier.reinstate',
  'tier.revoke',
  'tier.confirm',
  'tier.reject',
  'fill_station.create',
  'fill_station.update',
  'fill_station.retire',
  'event.create',
  'event.update',
  'event.cancel',
  'event.walk_in',
  'incident.report',
  'incident.review',
  'incident.close',
  'incident.suspend_tier',
  'member.imported',
  'club_data.import',
  'member.erase',
  'audit.personal_data_scrubbed',
  'club.front_door',
] as const
export type AuditAction = typeof AUDIT_ACTIONS[number]

/** Each action in words: the audit page's entries and its filter's choices. */
export const AUDIT_ACTION_WORDS: Record<AuditAction, Words> = {
  'member.approve': { label: 'Approved a sign-up', meaning: 'An admin approved a sign-up; the first dues make it an active membership.' },
  'member.suspend': { label: 'Suspended a membership', meaning: 'An admin suspended a membership: the member lost every right and was signed out.' },
  'member.reinstate': { label: 'Reinstated a membership', meaning: 'An admin lifted a suspension; the member\'s dues decide their status again.' },
  'member.resign': { label: 'Marked a membership resigned', meaning: 'An admin recorded that the member left the club; they were signed out.' },
  'member.rejoin': { label: 'Let a member rejoin', meaning: 'An admin restored a resigned membership; paid dues decide its status again.' },
  'member.edit': { label: 'Edited member details', meaning: 'An officer changed contact, birth date or guardian details; the trail names the fields, never their values.' },
  'member.roles': { label: 'Changed roles', meaning: 'An admin gave or took away roles, and with them what the member may do.' },
  'member.guardian_consent_request': { label: 'Asked a guardian for consent', meaning: 'A fresh consent link went to a junior\'s guardian and older links stopped working.' },
  'member.rename': { label: 'Changed a name', meaning: 'A member\'s name was changed, by the member or an officer.' },
  'member.signed_up': { label: 'Signed up', meaning: 'Someone joined through the club\'s sign-up page and now waits for approval.' },
  'member.guardian_consent': { label: 'Guardian gave consent', meaning: 'A junior\'s guardian confirmed consent from the e-mailed link.' },
  'member.admin_created': { label: 'Admin created from the command line', meaning: 'Whoever runs the server created an admin with npm run admin:create.' },
  'member.welcome': { label: 'Sent the welcome', meaning: 'An admin queued the welcome e-mail, with a link to choose a password, to imported members who had none and had not been welcomed.' },
  'account.password_reset': { label: 'Reset a password from an e-mailed link', meaning: 'A member set a new password from a reset link; every session of the account was signed out.' },
  'waiver.publish': { label: 'Published a waiver version', meaning: 'A new waiver version came into force; every member is asked to accept it.' },
  'notice.retry': { label: 'Retried a notice', meaning: 'An officer put a failed or skipped e-mail back in the queue.' },
  'notice.run': { label: 'Sent due e-mails now', meaning: 'An admin ran the reminder scans and the queue at once instead of waiting for the next run.' },
  'vessel.proof_test': { label: 'Recorded a proof test', meaning: 'An instructor witnessed a vessel\'s proof test; a pass rated it and put it in service, a leak sent it back for repair, a burst failed it.' },
  'vessel.report': { label: 'Reported what ends a proof', meaning: 'Something that ends a proof happened to a vessel; it waits for a new proof test.' },
  'vessel.quarantine': { label: 'Quarantined a vessel', meaning: 'The safety officer held a vessel: no fills until it is reviewed and released.' },
  'vessel.release': { label: 'Released a vessel', meaning: 'The safety officer released a quarantined vessel; it needs a new proof test before any fill.' },
  'vessel.retire': { label: 'Retired a vessel', meaning: 'Its owner or the safety officer took a vessel out of use for good.' },
  'policy.vessels': { label: 'Changed the vessel policy', meaning: 'The safety officer changed the proof margin, intervals, fill limits, cure wait, air tests or distance rule.' },
  'training.course': { label: 'Changed a course', meaning: 'The safety officer changed a course\'s name, description, validity, pass mark or practical sign-off.' },
  'training.session': { label: 'Scheduled a training session', meaning: 'An instructor scheduled a session of a course for members to enrol in.' },
  'training.issue': { label: 'Issued a session\'s training records', meaning: 'An instructor issued the records of everyone who attended a session, passes and fails, in one step.' },
  'training.retraining': { label: 'Flagged a record for retraining', meaning: 'An instructor or the safety officer flagged a training record: it is not current until a new record is issued.' },
  'training.record_elsewhere': { label: 'Entered a course taken elsewhere', meaning: 'An instructor entered a record of a course the member took elsewhere, with its evidence.' },
  'training.record_confirm': { label: 'Confirmed an imported training record', meaning: 'An instructor confirmed a training record brought in by a roster import: from now on it counts like any other.' },
  'training.record_reject': { label: 'Rejected an imported training record', meaning: 'An instructor deleted an unconfirmed training record brought in by a roster import, with the reason.' },
  'station.create': { label: 'Added a workshop station', meaning: 'An officer added a bench, cure-rack slot, booth or rig with its courses, hours and limits.' },
  'station.update': { label: 'Changed a workshop station', meaning: 'An officer changed a station\'s name, required courses, opening hours, longest booking or adults-only rule.' },
  'booking.cancel': { label: 'Cancelled a member\'s booking', meaning: 'An officer cancelled another member\'s workshop booking, with the reason; the member was e-mailed.' },
  'dues.offline_payment': { label: 'Recorded a cash or transfer payment', meaning: 'An admin recorded dues paid in cash or by bank transfer; it renewed the membership like a card payment.' },
  'dues.refund': { label: 'Refunded a payment', meaning: 'An admin refunded the latest dues payment in full; paid-through returned to the date that payment replaced.' },
  'dues.member_plan': { label: 'Changed a member\'s dues plan', meaning: 'An admin chose the plan a member renews on.' },
  'dues.plan_edit': { label: 'Changed a dues plan', meaning: 'An admin changed a plan\'s name, price, currency or period; payments already made keep theirs.' },
  'club.front_door': { label: 'Changed the public page', meaning: 'An admin changed the club\'s name, the public page\'s texts or which of its sections visitors see.' },
  'policy.tiers': { label: 'Changed the tier table', meaning: 'The safety officer changed a pressure tier\'s name, fill cap, prerequisites, validity or renewal fills, or the junior cap.' },
  'tier.grant': { label: 'Signed off a pressure tier', meaning: 'An assessor granted a member a pressure tier after the server found every prerequisite met.' },
  'tier.renew': { label: 'Renewed a pressure tier', meaning: 'An assessor re-signed a member\'s tier after enough fills within its validity; the validity restarted.' },
  'tier.initial': { label: 'Granted the first T4 (command line)', meaning: 'Whoever runs the server granted the first T4 of a club that never had one (npm run tier:initial); prerequisites were waived.' },
  'tier.suspend': { label: 'Suspended a pressure tier', meaning: 'The safety officer suspended a member\'s tier until reinstated; the member falls back to the highest tier still valid.' },
  'tier.reinstate': { label: 'Reinstated a pressure tier', meaning: 'The safety officer lifted a tier\'s suspension; it counts again until its expiry.' },
  'tier.revoke': { label: 'Revoked a pressure tier', meaning: 'The safety officer withdrew a member\'s tier; only a new grant restores it.' },
  'tier.confirm': { label: 'Confirmed an imported pressure tier', meaning: 'An assessor qualified to sign off the tier confirmed one brought in by a roster import: from now on it counts like any other.' },
  'tier.reject': { label: 'Rejected an imported pressure tier', meaning: 'An assessor deleted an unconfirmed tier brought in by a roster import, with the reason.' },
  'fill_station.create': { label: 'Added a fill station', meaning: 'An officer added a launcher with the rating of its lowest-rated part and its gauge.' },
  'fill_station.update': { label: 'Changed a fill station', meaning: 'An officer changed a fill station\'s name, rating or gauge (a new calibration date, for one).' },
  'fill_station.retire': { label: 'Retired a fill station', meaning: 'An officer took a fill station out of use; past events keep it in their fill log.' },
  'event.create': { label: 'Created a launch event', meaning: 'A safety officer or admin set up a launch event: day, site, pressure cap, fill stations and staff.' },
  'event.update': { label: 'Changed a launch event', meaning: 'A safety officer or admin changed a launch event; a new day e-mailed every registered member.' },
  'event.cancel': { label: 'Cancelled a launch event', meaning: 'A safety officer or admin cancelled a launch event; every registered member was e-mailed the reason.' },
  'event.walk_in': { label: 'Added a walk-in', meaning: 'A member of the event\'s staff added a member on the day who had not registered.' },
  'incident.report': { label: 'Reported an incident', meaning: 'A member reported a burst, uncommanded launch, injury, near miss or other incident; a vessel it names was quarantined at once.' },
  'incident.review': { label: 'Reviewed an incident', meaning: 'The safety officer changed an incident\'s review notes, findings or actions.' },
  'incident.close': { label: 'Closed an incident', meaning: 'The safety officer closed an incident with its outcome; a quarantined vessel stays quarantined until released.' },
  'member.imported': { label: 'Set roles or paid-through by import', meaning: 'A roster import gave a member roles or a paid-through date (roles are only ever added, paid-through only moved later).' },
  'club_data.import': { label: 'Imported a roster', meaning: 'An admin imported a roster file; the event counts the rows created, updated, unchanged and refused.' },
  'incident.suspend_tier': { label: 'Suspended a tier over an incident', meaning: 'The safety officer suspended the pressure tier of a person involved, from the incident page.' },
  'member.erase': { label: 'Erased a member on request', meaning: 'An admin erased a member who asked: their personal details were removed and their safety and payment records now carry a pseudonym.' },
  'audit.personal_data_scrubbed': { label: 'Removed names from old audit events', meaning: 'An upgrade removed, once, the names and e-mails that audit events written before the trail named people by id still held.' },
}

/** Whether `action` is one the server records. */
export function isAuditAction(action: string): action is AuditAction {
  return (AUDIT_ACTIONS as readonly string[]).includes(action)
}

/** The label for `action` (rows keep it as text), or the text itself for an action no longer listed. */
export function auditActionLabel(action: string): string {
  return isAuditAction(action) ? AUDIT_ACTION_WORDS[action].label : action
}

/** What an audit event is about, in words (`subjectType` as the rows keep it). */
export const AUDIT_SUBJECT_LABELS: Record<string, string> = {
  membership: 'A member',
  user: 'An account',
  waiver: 'A waiver version',
  notice: 'An e-mail in the outbox',
  club: 'The club',
  vessel: 'A vessel',
  course: 'A course',
  training_session: 'A training session',
  training_record: 'A training record',
  station: 'A workshop station',
  booking: 'A workshop booking',
  payment: 'A dues payment',
  dues_plan: 'A dues plan',
  tier_levels: 'The club\'s tier table',
  fill_station: 'A fill station',
  launch_event: 'A launch event',
  incident: 'An incident',
  import_job: 'A roster import',
}

/** The subject types the audit trail's filter offers (those with words above). */
export const AUDIT_SUBJECT_TYPES = Object.keys(AUDIT_SUBJECT_LABELS) as [string, ...string[]]

/** The words for what an event is about, or the subject type itself when it has none. */
export function auditSubjectLabel(subjectType: string): string {
  return AUDIT_SUBJECT_LABELS[subjectType] ?? subjectType
}

/** "Phone, Emergency contact changed" for `fields` (a field without a label shows its code). */
export function changedFieldsText(fields: readonly string[]): string {
  if (!fields.length) return 'Nothing changed'
  const labels = [...new Set(fields.map(fieldLabel))]
  return `${labels.join(', ')} changed`
}

/** The field names an audit event's `after` says changed (`{ changed: [...] }`), or null when it records values. */
export function changedFieldsOf(after: Record<string, unknown> | null): string[] | null {
  const changed = after?.changed
  return Array.isArray(changed) && changed.every(f => typeof f === 'string') ? changed as string[] : null
}

const OUTCOME_LABELS: Record<string, string> = { done: 'Finished', failed: 'Stopped by an error' }
const INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/
const CALENDAR_DATE = /^\d{4}-\d{2}-\d{2}$/

/**
 * One before/after value of an audit event in words: statuses and roles by their labels (a notice's
 * status for a notice, a membership's otherwise), instants in the club's time zone `timeZone` and
 * format (UTC, said so, while it is unknown), calendar dates written out, yes/no, "—" for nothing.
 */
export function auditValueText(field: string, value: unknown, opts: { subjectType: string, timeZone: string | null }): string {
  if (value === null || value === undefined || value === '') return '—'
  if (typeof value === 'boolean') return value ? 'Yes' : 'No'
  if (field === 'status' && typeof value === 'string') {
    const words = opts.subjectType === 'notice'
      ? NOTICE_STATUS_WORDS[value as NoticeStatus]
      : MEMBERSHIP_STATUS_WORDS[value as MembershipStatus]
    return words?.label ?? value
  }
  if (field === 'roles' && Array.isArray(value)) return value.map(r => ROLE_LABELS[r as Role] ?? String(r)).join(', ') || '—'
  if (field === 'outcome' && typeof value === 'string') return OUTCOME_LABELS[value] ?? value
  if (Array.isArray(value)) return value.map(String).join(', ') || '—'
  if (typeof value === 'string' && INSTANT.test(value) && !Number.isNaN(Date.parse(value))) {
    return opts.timeZone ? formatInstant(value, opts.timeZone) : `${formatInstant(value, 'UTC')} UTC`
  }
  if (typeof value === 'string' && CALENDAR_DATE.test(value)) return formatCalendarDate(value)
  if (typeof value === 'object') return JSON.stringify(value)
  return String(value)
}
