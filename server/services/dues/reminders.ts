import { QueryTypes } from 'sequelize'
import type { Club } from '../../models'
import { addCalendarDays } from '#shared/utils/dates'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, type NoticeKindName } from '../notices'

/**
 * The dues reminders, each due a number of days from the paid-through date (PT): 30 and 7 days
 * before, the first day of grace (PT + 1) and the day the membership lapses (PT + grace + 1). Each is
 * queued while its window is open (from its due day until the next stage), so a scan that missed a
 * day still sends it, and a member who renewed in between gets none.
 */
function stages(graceDays: number): { kind: NoticeKindName, offset: number, until: number }[] {
  return [
    { kind: 'dues_reminder', offset: -30, until: 0 },
    { kind: 'dues_reminder_week', offset: -7, until: 0 },
    { kind: 'dues_grace', offset: 1, until: graceDays },
    { kind: 'dues_lapsed', offset: graceDays + 1, until: graceDays + 14 },
  ]
}

interface DueMember { id: string, paid_through: string, email: string, name: string, notice_opt_outs: string[] }

/**
 * Queues every dues reminder due for members of `club` at `now`; suspended and resigned members and
 * those who opted out of a kind get none. One per member, kind and paid-through date: the notices'
 * unique key (member, kind, subject = PT, due date) makes a second scan — even one running at the
 * same moment — queue nothing. Returns how many it queued.
 */
export async function scanDuesReminders(club: Club, now: Date): Promise<number> {
  const today = clubToday(club, now)
  let queued = 0
  for (const stage of stages(club.graceDays)) {
    // The stage is due when today is within [PT + offset, PT + until], i.e. PT within [today - until, today - offset].
    const due = await useDb().query<DueMember>(`
      SELECT m.id, m.paid_through::text AS paid_through, u.email, u.name, m.notice_opt_outs
      FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.club_id = :clubId AND m.paid_through BETWEEN :earliest AND :latest
        AND m.suspended_at IS NULL AND m.resigned_at IS NULL
        AND NOT (:kind = ANY (m.notice_opt_outs))
        AND NOT EXISTS (SELECT 1 FROM notices n WHERE n.membership_id = m.id AND n.kind = :kind
          AND n.subject_key = m.paid_through::text)
      ORDER BY m.paid_through, m.id`, {
      replacements: { clubId: club.id, kind: stage.kind, earliest: addCalendarDays(today, -stage.until), latest: addCalendarDays(today, -stage.offset) },
      type: QueryTypes.SELECT,
    })
    for (const m of due) {
      const added = await enqueueNotice({
        clubId: club.id,
        membershipId: m.id,
        kind: stage.kind,
        subjectKey: m.paid_through,
        dueOn: addCalendarDays(m.paid_through, stage.offset),
        toEmail: m.email,
        optOuts: m.notice_opt_outs,
        vars: { clubName: club.name, memberName: m.name, baseUrl: clubBaseUrl(club), paidThrough: m.paid_through, graceEnds: addCalendarDays(m.paid_through, club.graceDays) },
      })
      if (added) queued += 1
    }
  }
  return queued
}
