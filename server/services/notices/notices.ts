import { QueryTypes, type Transaction } from 'sequelize'
import { NOTICE_KINDS, type NoticeKindName, type NoticeVars } from './kinds'
import { composeNotice } from './render'
import { deriveOptOutKey, optOutUrl } from './opt-out'

let optOutKey: string | undefined

/** The key that signs opt-out links (see deriveOptOutKey); never sent to a browser. */
export function optOutSecret(): string {
  optOutKey ??= deriveOptOutKey(useRuntimeConfig().session.password)
  return optOutKey
}

/**
 * Kinds whose e-mail carries a one-time link. Their stored bodies hold the link (the token in
 * clear) only while the notice may still be sent: once it is sent, skipped or has failed for good
 * the token is blanked (SCRUB_LINKS_SQL), so the database keeps no usable link.
 */
export const ONE_TIME_LINK_KINDS = ['email_verification', 'password_reset', 'guardian_consent', 'set_password', 'welcome'] as const

const linkKinds = ONE_TIME_LINK_KINDS.map(kind => `'${kind}'`).join(', ')
const scrubColumn = (column: string) =>
  `${column} = CASE WHEN kind IN (${linkKinds}) THEN regexp_replace(${column}, 'token=[A-Za-z0-9_-]+', 'token=removed', 'g') ELSE ${column} END`

/** SQL SET assignments that blank the token of a one-time link in a notice's stored text and HTML bodies. */
export const SCRUB_LINKS_SQL = `${scrubColumn('text_body')}, ${scrubColumn('html_body')}`

export interface EnqueueInput {
  clubId: string
  membershipId: string
  kind: NoticeKindName
  /** What the notice is about (a token id, a vessel id …); '' when the kind has one per member and date. */
  subjectKey?: string
  /** Calendar date the notice is due (YYYY-MM-DD); with member, kind and subject it makes the notice unique. */
  dueOn: string
  toEmail: string
  /** Opt-outs the member has chosen; an optional kind they opted out of is not queued. */
  optOuts?: string[]
  /** Render variables; optOutUrl is filled in here for optional kinds. */
  vars: NoticeVars
}

/** What an imported account may be sent before the club's welcome: the welcome, and links it asks for. */
const KINDS_BEFORE_WELCOME: NoticeKindName[] = ['welcome', 'password_reset', 'set_password', 'email_verification']

/**
 * Queues one e-mail. The database's unique key (member, kind, subject, due date) makes this
 * idempotent: a second call — even a concurrent one — queues nothing and returns false.
 * Call kickNoticeQueue() (services/notices/queue.ts) once the surrounding transaction has committed.
 */
export async function enqueueNotice(input: EnqueueInput, transaction?: Transaction): Promise<boolean> {
  const optional = NOTICE_KINDS[input.kind].optional
  if (optional && input.optOuts?.includes(input.kind)) return false
  const link = optional ? optOutUrl(optOutSecret(), input.vars.baseUrl, input.membershipId, input.kind) : undefined
  const composed = composeNotice(input.kind, input.vars, link)
  // ON CONFLICT DO NOTHING: a concurrent run that queues the same notice simply gets nothing back.
  // An imported account (no password yet) gets nothing before its welcome but what it asks for
  // itself: the admin chooses when the club first writes to its imported members.
  const rows = await useDb().query<{ id: string }>(`
    INSERT INTO notices (club_id, membership_id, kind, subject_key, due_on, to_email, subject, text_body, html_body)
    SELECT :clubId, :membershipId, :kind, :subjectKey, :dueOn, :toEmail, :subject, :textBody, :htmlBody
     WHERE :kind IN (:beforeWelcome) OR NOT EXISTS (
       SELECT 1 FROM memberships m JOIN users u ON u.id = m.user_id
        WHERE m.id = :membershipId AND u.password_hash IS NULL
          AND NOT EXISTS (SELECT 1 FROM notices w WHERE w.membership_id = m.id AND w.kind = 'welcome'))
    ON CONFLICT (membership_id, kind, subject_key, due_on) DO NOTHING
    RETURNING id`, {
    replacements: {
      clubId: input.clubId,
      membershipId: input.membershipId,
      kind: input.kind,
      subjectKey: input.subjectKey ?? '',
      dueOn: input.dueOn,
      toEmail: input.toEmail,
      subject: composed.subject,
      textBody: composed.text,
      htmlBody: composed.html,
      beforeWelcome: KINDS_BEFORE_WELCOME,
    },
    type: QueryTypes.SELECT,
    transaction,
  })
  return rows.length > 0
}
