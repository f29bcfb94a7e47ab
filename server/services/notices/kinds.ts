/**
 * Every kind of e-mail Hoopwise sends, in one place: how it renders and whether a member may opt
 * out of it. Safety kinds are never optional. Each capability adds its own kinds here.
 */
import { lifetimeWords, tokenLifetimeWords, WELCOME_LINK_HOURS } from '../accounts'
import { JOINING_CAUTION, PRESSURE_CAUTION } from '#shared/utils/wording'
import { COMPOSITE_CAUTION } from '#shared/utils/training-words'

export interface NoticeVars {
  clubName: string
  memberName: string
  /** The club's public address, without a trailing slash; every link is built from it. */
  baseUrl: string
  /** Link for the action (verify, reset, consent …), when the kind has one. */
  actionUrl?: string
  /** One-click opt-out link, filled in by the queue for optional kinds. */
  optOutUrl?: string
  [key: string]: string | number | undefined
}

export interface RenderedNotice { subject: string, text: string, lines: string[], action?: { label: string, url: string } }

export interface NoticeKind {
  /** Optional kinds carry a one-click opt-out link; the rest cannot be switched off. */
  optional: boolean
  /** A short label for the outbox and the profile's notice settings. */
  label: string
  /** One sentence for the notice settings and the opt-out page: when this e-mail comes. */
  description?: string
  render: (vars: NoticeVars) => RenderedNotice
}

// Every dues e-mail says what paid dues do not do.
const DUES_FILL_NOTE = 'Paid dues keep your membership; they do not by themselves allow a fill. Filling also takes your pressure tier, current courses, the current waiver accepted and a vessel that passes its checks, and the club\'s rules on the day.'

function notice(subject: string, lines: string[], action?: { label: string, url?: string }): RenderedNotice {
  const act = action?.url ? { label: action.label, url: action.url } : undefined
  const text = [...lines, ...(act ? ['', `${act.label}: ${act.url}`] : [])].join('\n')
  return { subject, text, lines, action: act }
}

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October',
  'November', 'December']

/** A calendar date (YYYY-MM-DD) as e-mails show it: "14 March 2026"; anything else unchanged. */
export function longDate(date: string | number | undefined): string {
  const m = String(date ?? '').match(/^(\d{4})-(\d{2})-(\d{2})$/)
  return m ? `${Number(m[3])} ${MONTHS[Number(m[2]) - 1]} ${m[1]}` : String(date ?? '')
}

export const NOTICE_KINDS = {
  email_verification: {
    optional: false,
    label: 'E-mail confirmation',
    render: v => notice(`Confirm your e-mail for ${v.clubName}`, [
      `Hello ${v.memberName},`,
      `Please confirm this e-mail address for your ${v.clubName} account. The link works once and expires in ${tokenLifetimeWords('verify_email')}.`,
      JOINING_CAUTION,
    ], { label: 'Confirm my e-mail', url: v.actionUrl }),
  },
  password_reset: {
    optional: false,
    label: 'Password reset',
    render: v => notice(`Reset your ${v.clubName} password`, [
      `Hello ${v.memberName},`,
      `Someone (hopefully you) asked to reset your password. The link works once and expires in ${tokenLifetimeWords('reset_password')}.`,
      'If it was not you, ignore this message: your password stays as it is.',
    ], { label: 'Choose a new password', url: v.actionUrl }),
  },
  guardian_consent: {
    optional: false,
    label: 'Guardian consent',
    render: v => notice(`${v.memberName} asks for your consent to join ${v.clubName}`, [
      `Hello ${v.guardianName ?? ''},`.replace(' ,', ','),
      `${v.memberName} has signed up to ${v.clubName}, a water rocketry club, and named you as their parent or guardian.`,
      'Members under 18 train first, hold at most the club\'s junior tier (T1 by default: bottle fills up to 6 bar) and fill only under an instructor\'s supervision; composite and laminate work is for adults.',
      `If you agree to their membership, confirm with the link below (it works once and expires in ${tokenLifetimeWords('guardian_consent')}).`,
      JOINING_CAUTION,
    ], { label: 'I give my consent', url: v.actionUrl }),
  },
  // The first admin's account, made by `npm run admin:create -- --send-link`: a reset link by another name.
  set_password: {
    optional: false,
    label: 'Set password',
    render: v => notice(`Choose your ${v.clubName} password`, [
      `Hello ${v.memberName},`,
      `An administrator account for ${v.clubName} was created for you on Hoopwise. Choose your password with the link below; it works once and expires in ${tokenLifetimeWords('reset_password')}.`,
      'If it has expired, use "Forgot your password?" on the sign-in page to get a new one.',
    ], { label: 'Choose my password', url: v.actionUrl }),
  },
  // An imported member's first e-mail: the admin chose to send it (one button, once per member).
  welcome: {
    optional: false,
    label: 'Welcome (imported member)',
    render: v => notice(`Welcome to ${v.clubName} on Hoopwise`, [
      `Hello ${v.memberName},`,
      `${v.clubName} now keeps its membership, training and pressure tiers on Hoopwise, and your details came across from the club's old records. Choose a password with the link below to sign in; it works once and expires in ${lifetimeWords(WELCOME_LINK_HOURS)}.`,
      'Training records and tiers that came across count once an instructor or assessor of the club has confirmed them.',
      'If the link has expired, use "Forgot your password?" on the sign-in page to get a new one.',
    ], { label: 'Choose my password', url: v.actionUrl }),
  },
  // Safety: tells the owner of the account at once when someone else used a reset link.
  password_changed: {
    optional: false,
    label: 'Password changed',
    render: v => notice(`Your ${v.clubName} password was changed`, [
      `Hello ${v.memberName},`,
      `The password of your ${v.clubName} account was changed on ${longDate(v.changedOn)} with a reset link sent to this address, and every session signed in before was ended.`,
      'If it was you, there is nothing more to do. If it was not, ask for a new reset link at once and tell the club\'s officers.',
    ], { label: 'Reset my password', url: `${v.baseUrl}/forgot-password` }),
  },
  signup_approved: {
    optional: false,
    label: 'Sign-up approved',
    render: v => notice(`Welcome to ${v.clubName}`, [
      `Hello ${v.memberName},`,
      `Your sign-up to ${v.clubName} has been approved. Pay your first dues and accept the club's risk waiver to take part.`,
      JOINING_CAUTION,
    ], { label: 'See my standing', url: `${v.baseUrl}/standing` }),
  },
  dues_reminder: {
    optional: true,
    label: 'Dues renewal reminder',
    description: 'A reminder 30 days before your dues run out.',
    render: v => notice(`Your ${v.clubName} dues run out on ${longDate(v.paidThrough)}`, [
      `Hello ${v.memberName},`,
      `Your membership is paid through ${longDate(v.paidThrough)}. Renew before then to keep your membership in good standing without a gap; renewing early loses no days.`,
      DUES_FILL_NOTE,
    ], { label: 'Renew my membership', url: `${v.baseUrl}/dues/renew` }),
  },
  dues_reminder_week: {
    optional: true,
    label: 'Dues renewal reminder, a week before',
    description: 'A reminder 7 days before your dues run out.',
    render: v => notice(`A week left: your ${v.clubName} dues run out on ${longDate(v.paidThrough)}`, [
      `Hello ${v.memberName},`,
      `Your membership is paid through ${longDate(v.paidThrough)}, a week from now. Renew now to keep training and booking without a gap; renewing early loses no days.`,
      DUES_FILL_NOTE,
    ], { label: 'Renew my membership', url: `${v.baseUrl}/dues/renew` }),
  },
  dues_grace: {
    optional: true,
    label: 'Dues ran out (grace period)',
    description: 'Sent on the first day after your dues ran out.',
    render: v => notice(`Your ${v.clubName} dues ran out: you are in the grace period`, [
      `Hello ${v.memberName},`,
      `Your dues were paid through ${longDate(v.paidThrough)}. Until ${longDate(v.graceEnds)} you can still train, but not fill or book. Renew to be an active member again; the new year runs from the day you pay.`,
      DUES_FILL_NOTE,
    ], { label: 'Renew my membership', url: `${v.baseUrl}/dues/renew` }),
  },
  dues_lapsed: {
    optional: true,
    label: 'Membership lapsed',
    description: 'Sent on the day your membership lapses after the grace period.',
    render: v => notice(`Your ${v.clubName} membership has lapsed`, [
      `Hello ${v.memberName},`,
      `Your dues were paid through ${longDate(v.paidThrough)} and the grace period ended on ${longDate(v.graceEnds)}, so your membership has lapsed: no training, booking or fills until you renew. Paying again brings you back at once.`,
      DUES_FILL_NOTE,
    ], { label: 'Renew my membership', url: `${v.baseUrl}/dues/renew` }),
  },
  payment_receipt: {
    optional: false,
    label: 'Dues receipt',
    description: 'Your receipt, sent when a payment of your dues is received.',
    render: v => notice(`${v.clubName} receipt ${v.receiptNumber ?? ''}: dues paid through ${longDate(v.paidThrough)}`, [
      `Hello ${v.memberName},`,
      `${v.clubName} received your dues: ${v.amount ?? ''} by ${String(v.method ?? '').toLowerCase()} on ${longDate(v.paidOn)} for the ${v.planName ?? ''} plan, covering ${longDate(v.periodFrom)} to ${longDate(v.paidThrough)}. Receipt number ${v.receiptNumber ?? ''}.`,
      'You can download this receipt again at any time from "My standing".',
      DUES_FILL_NOTE,
    ], { label: 'See my receipt', url: `${v.baseUrl}/dues/receipts/${v.paymentId ?? ''}` }),
  },
  refund_confirmation: {
    optional: false,
    label: 'Dues refund',
    description: 'Sent when a payment of your dues is refunded.',
    render: v => notice(`${v.clubName}: your dues payment ${v.receiptNumber ?? ''} was refunded`, [
      `Hello ${v.memberName},`,
      `${v.clubName} refunded your dues payment ${v.receiptNumber ?? ''} (${v.amount ?? ''}, ${String(v.method ?? '').toLowerCase()}) in full. ${v.paidThrough ? `Your membership is now paid through ${longDate(v.paidThrough)}.` : 'Your membership now has no dues paid.'}`,
      'To stay a member, renew when it suits you.',
      DUES_FILL_NOTE,
    ], { label: 'Renew my membership', url: `${v.baseUrl}/dues/renew` }),
  },
  // Safety: a vessel whose proof lapses is not filled; the owner hears 30 days ahead.
  proof_lapsing: {
    optional: false,
    label: 'Proof lapsing in 30 days',
    description: 'Sent 30 days before a vessel\'s proof test stops being current.',
    render: v => notice(`The proof of ${v.vesselTag} ${v.vesselName} lapses on ${longDate(v.validThrough)}`, [
      `Hello ${v.memberName},`,
      `The proof test of your vessel ${v.vesselTag} (${v.vesselName}) is current through ${longDate(v.validThrough)}. After that day it may not be filled until an instructor witnesses a new proof test.`,
      'Ask for a proof test on the vessel\'s page in good time. A repair, damage, a crash or heat exposure ends the proof sooner: report it, and do not fill the vessel.',
      PRESSURE_CAUTION,
    ], { label: 'See the vessel', url: `${v.baseUrl}/vessels/${v.vesselTag}` }),
  },
  // Safety: a record that lapses no longer lets the member do what the course guards (a station, a tier).
  training_expiring: {
    optional: false,
    label: 'Training record expiring (60, 30 and 7 days)',
    description: 'Sent 60, 30 and 7 days before a training record, a respirator fit test included, stops being current.',
    render: v => notice(`Your ${v.courseName} record expires on ${longDate(v.expiresOn)}`, [
      `Hello ${v.memberName},`,
      `Your training record "${v.courseName}" is current through ${longDate(v.expiresOn)} (${v.daysBefore} days from when this was sent). After that day it no longer counts for the stations, fills and tiers that need it.`,
      v.courseCode === 'respirator_fit'
        ? 'A tight-fitting respirator is fit-tested before first use and at least every 12 months: book your fit test before this one runs out.'
        : 'Enrol in a session of the course in good time to keep it current.',
    ], { label: 'See my training', url: `${v.baseUrl}/training` }),
  },
  // Safety: a tier that expires stops allowing fills above the tier below; the holder hears 60, 30 and 7 days ahead.
  tier_expiring: {
    optional: false,
    label: 'Pressure tier expiring (60, 30 and 7 days)',
    description: 'Sent 60, 30 and 7 days before a pressure tier you hold expires.',
    render: v => notice(`Your pressure tier ${v.tierCode} (${v.tierName}) expires on ${longDate(v.expiresOn)}`, [
      `Hello ${v.memberName},`,
      `Your pressure tier ${v.tierCode} (${v.tierName}) is valid through ${longDate(v.expiresOn)} (${v.daysBefore} days from when this was sent). After that day you fall back to the highest tier you still hold, and fills above its cap are refused.`,
      'An instructor renews the tier once you have logged the club\'s minimum fills within its validity: ask at the next launch event.',
      PRESSURE_CAUTION,
    ], { label: 'See my standing', url: `${v.baseUrl}/standing` }),
  },
  // Safety: the member must know at once that the tier no longer allows their fills.
  tier_suspended: {
    optional: false,
    label: 'Pressure tier suspended',
    description: 'Sent when the safety officer suspends a pressure tier you hold.',
    render: v => notice(`Your pressure tier ${v.tierCode} (${v.tierName}) is suspended`, [
      `Hello ${v.memberName},`,
      `The safety officer of ${v.clubName} suspended your pressure tier ${v.tierCode} (${v.tierName}) until it is reinstated. The reason given: ${v.reason}`,
      'Until then you fall back to the highest tier you still hold, and fills above its cap are refused. Talk to the safety officer about what reinstates it.',
    ], { label: 'See my standing', url: `${v.baseUrl}/standing` }),
  },
  tier_reinstated: {
    optional: false,
    label: 'Pressure tier reinstated',
    description: 'Sent when the safety officer lifts the suspension of a pressure tier you hold.',
    render: v => notice(`Your pressure tier ${v.tierCode} (${v.tierName}) is reinstated`, [
      `Hello ${v.memberName},`,
      `The safety officer of ${v.clubName} reinstated your pressure tier ${v.tierCode} (${v.tierName}). It counts again through its expiry on ${longDate(v.expiresOn)}.`,
      PRESSURE_CAUTION,
    ], { label: 'See my standing', url: `${v.baseUrl}/standing` }),
  },
  training_moved_up: {
    optional: true,
    label: 'Moved up from a waiting list',
    description: 'When someone withdraws and you get their place in a training session.',
    render: v => notice(`You have a place: ${v.courseName}, ${v.startsAt}`, [
      `Hello ${v.memberName},`,
      `A place came free in the ${v.courseName} session on ${v.startsAt} at ${v.place}, and you were next on the waiting list: it is yours now.`,
      'If you can no longer come, withdraw on the sessions page so the next member gets the place.',
      ...(v.courseCode === 'composite_ppe' ? [COMPOSITE_CAUTION] : []),
    ], { label: 'See the session', url: `${v.baseUrl}/training/sessions/${v.sessionId}` }),
  },
  booking_confirmed: {
    optional: true,
    label: 'Workshop booking confirmed',
    description: 'Sent when you book a workshop station.',
    render: v => notice(`Booked: ${v.stationName}, ${v.startsText}`, [
      `Hello ${v.memberName},`,
      `You booked ${v.stationName} at ${v.clubName} from ${v.startsText} to ${v.endsText} (the club's time).`,
      ...(v.cureText ? [String(v.cureText)] : []),
      'Resin and hardener sensitise skin: gloves, eye protection and the ventilation on whenever they are open. Cancel on your bookings page if your plans change, so someone else can use it.',
    ], { label: 'See my bookings', url: `${v.baseUrl}/workshop/mine` }),
  },
  booking_cancelled: {
    optional: true,
    label: 'Workshop booking cancelled',
    description: 'Sent when a booking of yours is cancelled, by you or by an officer.',
    render: v => notice(`Cancelled: ${v.stationName}, ${v.startsText}`, [
      `Hello ${v.memberName},`,
      `Your booking of ${v.stationName} at ${v.clubName} from ${v.startsText} to ${v.endsText} (the club's time) is cancelled.`,
      ...(v.reasonText ? [String(v.reasonText)] : []),
    ], { label: 'Book again', url: `${v.baseUrl}/workshop` }),
  },
  // Safety: members registered for a launch event hear at once when its day changes or it is cancelled.
  launch_event_moved: {
    optional: false,
    label: 'Launch event moved',
    description: 'Sent to every registered member when a launch event moves to another day.',
    render: v => notice(`Moved: the launch at ${v.eventSite ?? ''} is now on ${longDate(v.toDate)}`, [
      `Hello ${v.memberName},`,
      `The launch event at ${v.eventSite ?? ''} you registered for has moved from ${longDate(v.fromDate)} to ${longDate(v.toDate)}. You are still registered; if the new day does not suit you, withdraw on the event's page before the day.`,
      PRESSURE_CAUTION,
    ], { label: 'See the event', url: `${v.baseUrl}/events/${v.eventId ?? ''}` }),
  },
  launch_event_cancelled: {
    optional: false,
    label: 'Launch event cancelled',
    description: 'Sent to every registered member when a launch event is cancelled.',
    render: v => notice(`Cancelled: the launch at ${v.eventSite ?? ''} on ${longDate(v.eventDate)}`, [
      `Hello ${v.memberName},`,
      `The launch event at ${v.eventSite ?? ''} on ${longDate(v.eventDate)} you registered for is cancelled: no fills take place there that day.`,
      `The reason: ${v.reasonText ?? ''}`,
    ], { label: 'See the club\'s events', url: `${v.baseUrl}/events` }),
  },
  // Safety: the safety officers hear of every incident at once; the e-mail names no personal details.
  incident_reported: {
    optional: false,
    label: 'Incident reported',
    description: 'Sent to every safety officer of the club when a member reports an incident.',
    render: v => notice(`Incident reported: ${v.kindLabel ?? 'Incident'} at ${v.place ?? ''} on ${longDate(v.happenedOn)}`, [
      `Hello ${v.memberName},`,
      `${v.reporterName ?? 'A member'} reported an incident at ${v.clubName}: ${String(v.kindLabel ?? 'an incident').toLowerCase()} at ${v.place ?? ''} on ${longDate(v.happenedOn)}.`,
      ...(v.vesselTag ? [`Vessel ${v.vesselTag} was named and is quarantined: no fills until you release it, and then only after a new passing proof test.`] : []),
      'Review it on the incident page: notes, findings, actions, and the tiers of the people involved.',
    ], { label: 'Review the incident', url: `${v.baseUrl}/incidents/${v.incidentId ?? ''}` }),
  },
  incident_closed: {
    optional: false,
    label: 'Incident closed',
    description: 'Sent to the member who reported an incident when the safety officer closes it.',
    render: v => notice(`Incident closed: ${v.kindLabel ?? 'Incident'} at ${v.place ?? ''} on ${longDate(v.happenedOn)}`, [
      `Hello ${v.memberName},`,
      `The safety officer of ${v.clubName} closed the incident you reported (${String(v.kindLabel ?? 'an incident').toLowerCase()} at ${v.place ?? ''} on ${longDate(v.happenedOn)}). The outcome: ${v.outcome ?? ''}`,
      'A vessel quarantined over it stays quarantined until the safety officer releases it, and then needs a new passing proof test.',
      PRESSURE_CAUTION,
    ], { label: 'See the incident', url: `${v.baseUrl}/incidents/${v.incidentId ?? ''}` }),
  },
  // Safety: a fill a device allowed offline that the server, on the same facts, refuses.
  offline_fill_flagged: {
    optional: false,
    label: 'Offline fill flagged',
    description: 'Sent to every safety officer of the club when a fill recorded without a network turns out to break a rule.',
    render: v => notice(`Fill flagged: vessel ${v.vesselTag ?? ''} at ${v.eventSite ?? ''} on ${longDate(v.eventDate)}`, [
      `Hello ${v.memberName},`,
      `A fill of vessel ${v.vesselTag ?? ''} at the launch event at ${v.eventSite ?? ''} on ${longDate(v.eventDate)} was recorded on a device without a network, and the server, judging it on the facts at the moment it was recorded, would have refused it.`,
      `What the server found: ${v.reasonsText ?? ''}`,
      'The fill is kept in the fill log as it happened and counts toward the vessel\'s fill limit, never toward a tier. Look into it on the event\'s page.',
      PRESSURE_CAUTION,
    ], { label: 'See the event', url: `${v.baseUrl}/events/${v.eventId ?? ''}` }),
  },
} satisfies Record<string, NoticeKind>

export type NoticeKindName = keyof typeof NOTICE_KINDS

/** Whether `kind` names a kind in NOTICE_KINDS. */
export function isNoticeKind(kind: string): kind is NoticeKindName {
  return Object.hasOwn(NOTICE_KINDS, kind)
}

/** The kinds a member may switch off, in the order they are declared. */
export function optionalNoticeKinds(): NoticeKindName[] {
  return (Object.keys(NOTICE_KINDS) as NoticeKindName[]).filter(k => (NOTICE_KINDS[k] as NoticeKind).optional)
}

/** The outbox label of `kind` (the kind itself when a later release dropped it). */
export function noticeKindLabel(kind: string): string {
  return isNoticeKind(kind) ? NOTICE_KINDS[kind].label : kind
}
