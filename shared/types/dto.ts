import type { Role } from '../utils/permissions'
import type { MembershipStatus } from '../utils/membership-status'
import type { NoticeStatus } from '../utils/notice-status'

/** Plain objects the routes return. Never a model instance: no hashes or internal columns leak. */

export interface Paged<T> {
  items: T[]
  page: number
  pageSize: number
  total: number
}

export interface MemberListItemDto {
  id: string
  name: string
  email: string
  roles: Role[]
  status: MembershipStatus
  paidThrough: string | null
  joinedOn: string
  junior: boolean
}

export interface MemberDto extends MemberListItemDto {
  approvedAt: string | null
  suspendedAt: string | null
  suspendedReason: string | null
  resignedAt: string | null
  emailVerified: boolean
  birthDate: string | null
  guardianName: string | null
  guardianEmail: string | null
  guardianConsentAt: string | null
  phone: string | null
  emergencyContactName: string | null
  emergencyContactPhone: string | null
  unitPreference: 'bar' | 'psi'
  waiver: WaiverStandingDto
}

export interface WaiverStandingDto {
  currentVersion: number | null
  acceptedVersion: number | null
  acceptedAt: string | null
  /** True when the member has accepted the version in force (or none is published). */
  current: boolean
}

export interface ClubDto {
  id: string
  name: string
  timeZone: string
  units: 'bar' | 'psi'
  graceDays: number
}

/** "My standing": everything about the signed-in member on one page. */
export interface StandingDto {
  member: MemberDto
  club: ClubDto
  today: string
  /** Days left until paid-through (negative once passed), or null when never paid. */
  daysToExpiry: number | null
  /** Things the member should do, in plain sentences. */
  attention: { code: string, message: string, to?: string }[]
}

export interface WaiverDto {
  id: string
  version: number
  title: string
  body: string
  publishedAt: string
  publishedByName: string | null
}

export interface NoticeDto {
  id: string
  kind: string
  kindLabel: string
  memberName: string
  toEmail: string
  subject: string
  dueOn: string
  status: NoticeStatus
  attempts: number
  nextAttemptAt: string
  lastError: string | null
  sentAt: string | null
  createdAt: string
}

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

export interface DashboardDto {
  roles: Role[]
  /** `group` sorts cards into sections on the dashboard: mine, members, office, safety, audit. */
  cards: { key: string, title: string, value: number | string, hint: string, to?: string, tone: 'ok' | 'attention' | 'neutral', group?: string }[]
}

/** One line of "what needs my attention" (StandingDto.attention). */
export type AttentionItem = StandingDto['attention'][number]

/** A waiver version in the history, with how many members accepted it. */
export interface WaiverVersionDto extends WaiverDto {
  acceptances: number
}

/** GET /api/waivers/current: the version in force (null when none is published) and my standing against it. */
export interface CurrentWaiverDto {
  waiver: WaiverDto | null
  standing: WaiverStandingDto
}

/** POST /api/waivers/accept: my standing after accepting; `alreadyAccepted` when it had been accepted before. */
export interface WaiverAcceptedDto {
  standing: WaiverStandingDto
  alreadyAccepted: boolean
}

/** 422 body: a business rule refused the request. */
export interface RefusalBody {
  reasons: { code: string, message: string }[]
}

/** What one run of the notice job did (reminder scans, then the queue). */
export interface NoticeRunDto {
  /** Notices the reminder scans queued. */
  queued: number
  sent: number
  /** Failed to send and put back in the queue for a later try. */
  retried: number
  /** Given up on (permanent rejection, or too many attempts). */
  failed: number
  /** Not sent because the member opted out after the notice was queued. */
  skipped: number
}

/** The outbox page: a page of notices plus the kinds its filter offers. */
export interface OutboxPageDto extends Paged<NoticeDto> {
  kinds: { kind: string, label: string }[]
  /** The club's time zone, in which the outbox shows times. */
  timeZone: string
}

/** One optional notice kind as the member's settings show it. */
export interface NoticeSettingDto {
  kind: string
  label: string
  description: string | null
  enabled: boolean
}

/** The signed-in member's e-mail settings: the optional kinds, each on or off. */
export interface NoticeSettingsDto {
  kinds: NoticeSettingDto[]
}

/** What a one-click opt-out link is about, shown before the member confirms. */
export interface OptOutPreviewDto {
  kind: string
  label: string
  description: string | null
  clubName: string
  /** False for safety kinds, which cannot be switched off. */
  optional: boolean
  /** Already switched off (the link was used before). */
  optedOut: boolean
}
