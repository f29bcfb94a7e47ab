import type { Words } from './words'

/** Where an e-mail in the outbox stands; the database's CHECK on notices.status holds the same list. */
export const NOTICE_STATUSES = ['queued', 'sending', 'sent', 'failed', 'skipped'] as const
export type NoticeStatus = typeof NOTICE_STATUSES[number]

/** Each notice status in words: the outbox's chips and filter, the dashboard's cards. */
export const NOTICE_STATUS_WORDS: Record<NoticeStatus, Words> = {
  queued: { label: 'Queued', meaning: 'Waiting to go out on the next run of the queue.' },
  sending: { label: 'Sending', meaning: 'Being handed to the mail server right now.' },
  sent: { label: 'Sent', meaning: 'Accepted by the mail server.' },
  failed: { label: 'Failed', meaning: 'Given up on: the mail server refused it or every try failed.' },
  skipped: { label: 'Skipped', meaning: 'Not sent: the member switched this kind off, or a newer e-mail replaced it.' },
}
