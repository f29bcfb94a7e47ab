import type { Transaction } from 'sequelize'
import { Notice } from '../models'
import { NOTICE_KINDS, type NoticeKindName, type NoticeVars } from './notice-kinds'
import { renderNoticeHtml } from './notice-render'
import { optOutUrl } from './notice-opt-out'

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
  // optOutUrl is filled in here for optional kinds.
  vars: NoticeVars
}

/**
 * Queues one e-mail. The database's unique key (member, kind, subject, due date) makes this
 * idempotent: a second call — even a concurrent one — queues nothing and returns false.
 */
export async function enqueueNotice(input: EnqueueInput, transaction?: Transaction): Promise<boolean> {
  const kind = NOTICE_KINDS[input.kind]
  if (kind.optional && input.optOuts?.includes(input.kind)) return false
  const vars = {
    ...input.vars,
    optOutUrl: kind.optional ? optOutUrl(input.vars.baseUrl, input.membershipId, input.kind) : undefined,
  } as NoticeVars
  const rendered = (kind.render as (v: NoticeVars) => ReturnType<typeof kind.render>)(vars)
  const [, created] = await Notice.findOrCreate({
    where: { membershipId: input.membershipId, kind: input.kind, subjectKey: input.subjectKey ?? '', dueOn: input.dueOn },
    defaults: {
      clubId: input.clubId,
      toEmail: input.toEmail,
      subject: rendered.subject,
      textBody: vars.optOutUrl ? `${rendered.text}\n\n--\nStop these e-mails: ${vars.optOutUrl}` : rendered.text,
      htmlBody: renderNoticeHtml(rendered, vars),
    },
    transaction,
  })
  return created
}
