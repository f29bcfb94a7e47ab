import type { Paged } from './common'
import type { NoticeStatus } from '../utils/notice-status'

/** Notices (e-mails), the outbox and e-mail settings. Plain objects the routes return, never model instances. */

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
