import { QueryTypes } from 'sequelize'
import type { NoticeDto, OutboxPageDto } from '#shared/types/notices'
import type { OutboxQuery } from '#shared/schemas/notice'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { NOTICE_KINDS, noticeKindLabel } from './kinds'
import { kickNoticeQueue } from './queue'
import { ONE_TIME_LINK_KINDS } from './notices'

interface NoticeRow {
  id: string
  kind: string
  member_name: string
  to_email: string
  subject: string
  due_on: string
  status: NoticeDto['status']
  attempts: number
  next_attempt_at: Date
  last_error: string | null
  sent_at: Date | null
  created_at: Date
}

const SELECT_NOTICE = `
  SELECT n.id, n.kind, u.name AS member_name, n.to_email, n.subject, n.due_on::text AS due_on, n.status, n.attempts,
    n.next_attempt_at, n.last_error, n.sent_at, n.created_at
  FROM notices n JOIN memberships m ON m.id = n.membership_id JOIN users u ON u.id = m.user_id`

function toNoticeDto(r: NoticeRow): NoticeDto {
  return {
    id: r.id,
    kind: r.kind,
    kindLabel: noticeKindLabel(r.kind),
    memberName: r.member_name,
    toEmail: r.to_email,
    subject: r.subject,
    dueOn: r.due_on,
    status: r.status,
    attempts: r.attempts,
    nextAttemptAt: new Date(r.next_attempt_at).toISOString(),
    lastError: r.last_error,
    sentAt: r.sent_at ? new Date(r.sent_at).toISOString() : null,
    createdAt: new Date(r.created_at).toISOString(),
  }
}

/** One page of `club`'s outbox, newest first, filtered by status and kind (indexed by club and time). */
export async function listOutbox(club: { id: string, timeZone: string }, q: OutboxQuery): Promise<OutboxPageDto> {
  const clubId = club.id
  const where = ['n.club_id = :clubId', q.status ? 'n.status = :status' : '', q.kind ? 'n.kind = :kind' : ''].filter(Boolean).join(' AND ')
  const replacements = { clubId, status: q.status, kind: q.kind, limit: q.pageSize, offset: (q.page - 1) * q.pageSize }
  const db = useDb()
  const [rows, [count]] = await Promise.all([
    db.query<NoticeRow>(`${SELECT_NOTICE} WHERE ${where} ORDER BY n.created_at DESC, n.id DESC LIMIT :limit OFFSET :offset`,
      { replacements, type: QueryTypes.SELECT }),
    db.query<{ total: number }>(`SELECT count(*)::int AS total FROM notices n WHERE ${where}`, { replacements, type: QueryTypes.SELECT }),
  ])
  return {
    items: rows.map(toNoticeDto),
    page: q.page,
    pageSize: q.pageSize,
    total: count?.total ?? 0,
    kinds: Object.entries(NOTICE_KINDS).map(([kind, def]) => ({ kind, label: def.label })),
    timeZone: club.timeZone,
  }
}

/**
 * Puts a notice of the actor's club back in the queue, due now (failed, skipped or still queued),
 * with an audit event. 404 when it is not in the club; 409 when it was sent or is being sent; 422
 * LINK_REMOVED for a failed or skipped notice whose one-time link has been blanked.
 */
export async function retryNotice(actor: Actor, noticeId: string): Promise<NoticeDto> {
  const clubId = actor.club.id
  const db = useDb()
  const dto = await inTransaction(async (transaction) => {
    const before = await lockNotice(clubId, noticeId, transaction)
    if (!before) notFound('No such notice')
    if (before.status === 'sent') conflict('This notice has already been sent.')
    if (before.status === 'sending') conflict('This notice is being sent right now.')
    if (before.status !== 'queued' && (ONE_TIME_LINK_KINDS as readonly string[]).includes(before.kind)) {
      refuse({ code: 'LINK_REMOVED', message: 'This e-mail carried a one-time link, which was removed when it failed or was skipped. The member (or guardian) has to ask for a new link.' })
    }
    await db.query(`UPDATE notices SET status = 'queued', next_attempt_at = now(), locked_until = NULL, updated_at = now()
      WHERE id = :id`, { replacements: { id: noticeId }, transaction })
    await recordAudit(actor, clubId, {
      action: 'notice.retry',
      subjectType: 'notice',
      subjectId: noticeId,
      // Not the last error: a mail server's reply may quote the recipient's address.
      before: { status: before.status, attempts: before.attempts },
      after: { status: 'queued' },
    }, transaction)
    const [row] = await db.query<NoticeRow>(`${SELECT_NOTICE} WHERE n.id = :id`,
      { replacements: { id: noticeId }, type: QueryTypes.SELECT, transaction })
    return toNoticeDto(row!)
  })
  kickNoticeQueue()
  return dto
}
