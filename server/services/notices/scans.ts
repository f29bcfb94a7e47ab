import { QueryTypes } from 'sequelize'
import { Club } from '../../models'
import { DUES_RENEWAL_NOTICE_DAYS } from '#shared/utils/membership-status'
import { addCalendarDays } from '#shared/utils/dates'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice } from './notices'
import { proofsLapsingSoon } from '../vessels'
import { trainingRecordsExpiringSoon } from '../training'

interface DueMember { id: string, paid_through: string, email: string, name: string }

/**
 * Queues a `dues_reminder` for every member of `club` whose dues run out within the next 30 days
 * ("today" in the club's time zone), unless suspended, resigned or opted out. Due on paid-through
 * minus 30 days, so each member gets one per dues period however often the scan runs (the unique
 * key in the database settles concurrent scans). Returns how many notices it queued.
 */
async function scanClubDuesReminders(club: Club, now: Date): Promise<number> {
  const today = clubToday(club, now)
  // Members already reminded for this period are left out here; ON CONFLICT covers a concurrent scan.
  const due = await useDb().query<DueMember>(`
    SELECT m.id, m.paid_through::text AS paid_through, u.email, u.name
    FROM memberships m JOIN users u ON u.id = m.user_id
    WHERE m.club_id = :clubId AND m.paid_through BETWEEN :today AND :until
      AND m.suspended_at IS NULL AND m.resigned_at IS NULL
      AND NOT ('dues_reminder' = ANY (m.notice_opt_outs))
      AND NOT EXISTS (SELECT 1 FROM notices n WHERE n.membership_id = m.id AND n.kind = 'dues_reminder'
        AND n.subject_key = m.paid_through::text AND n.due_on = m.paid_through - :days)
    ORDER BY m.paid_through, m.id`, {
    replacements: { clubId: club.id, today, until: addCalendarDays(today, DUES_RENEWAL_NOTICE_DAYS), days: DUES_RENEWAL_NOTICE_DAYS },
    type: QueryTypes.SELECT,
  })
  let queued = 0
  for (const m of due) {
    const added = await enqueueNotice({
      clubId: club.id,
      membershipId: m.id,
      kind: 'dues_reminder',
      subjectKey: m.paid_through,
      dueOn: addCalendarDays(m.paid_through, -DUES_RENEWAL_NOTICE_DAYS),
      toEmail: m.email,
      vars: { clubName: club.name, memberName: m.name, baseUrl: clubBaseUrl(club), paidThrough: m.paid_through },
    })
    if (added) queued += 1
  }
  return queued
}

/**
 * Queues a `proof_lapsing` notice to the owner of every in-service vessel of `club` whose proof is
 * current only through the next 30 days. One per vessel and proof: the subject is the vessel, the due
 * date the proof's last day, so a new proof (a new last day) brings a new notice and a rerun none.
 * Safety: nobody can opt out. Returns how many it queued.
 */
async function scanClubProofLapsing(club: Club, now: Date): Promise<number> {
  const { proofs } = await proofsLapsingSoon(club.id, now)
  let queued = 0
  for (const p of proofs) {
    const added = await enqueueNotice({
      clubId: club.id,
      membershipId: p.ownerMembershipId,
      kind: 'proof_lapsing',
      subjectKey: p.vesselId,
      dueOn: p.validThroughOn,
      toEmail: p.ownerEmail,
      vars: { clubName: club.name, memberName: p.ownerName, baseUrl: clubBaseUrl(club), vesselTag: p.tag, vesselName: p.name, validThrough: p.validThroughOn },
    })
    if (added) queued += 1
  }
  return queued
}

/**
 * Queues a `training_expiring` notice for every member whose latest record of a course (the
 * respirator fit test included) expires within 60 days: the 60-, 30- and 7-day warnings, each once.
 * The subject is the record, the due date its expiry minus the warning's days, so a rerun queues
 * nothing and a new record (a new expiry) starts again. Safety: nobody can opt out. Returns how many.
 */
async function scanClubTrainingExpiring(club: Club, now: Date): Promise<number> {
  let queued = 0
  for (const r of await trainingRecordsExpiringSoon(club.id, clubToday(club, now))) {
    const added = await enqueueNotice({
      clubId: club.id,
      membershipId: r.membershipId,
      kind: 'training_expiring',
      subjectKey: r.recordId,
      dueOn: addCalendarDays(r.expiresOn, -r.daysBefore),
      toEmail: r.email,
      vars: { clubName: club.name, memberName: r.name, baseUrl: clubBaseUrl(club), courseName: r.courseName, courseCode: r.courseCode, expiresOn: r.expiresOn, daysBefore: r.daysBefore },
    })
    if (added) queued += 1
  }
  return queued
}

/** Runs every reminder scan for club `clubId` (or every club); returns how many notices were queued. */
export async function runNoticeScans(opts: { clubId?: string, now?: Date } = {}): Promise<number> {
  const clubs = await Club.findAll({ where: opts.clubId ? { id: opts.clubId } : {}, order: [['createdAt', 'ASC']] })
  let queued = 0
  for (const club of clubs) {
    queued += await scanClubDuesReminders(club, opts.now ?? new Date())
    queued += await scanClubProofLapsing(club, opts.now ?? new Date())
    queued += await scanClubTrainingExpiring(club, opts.now ?? new Date())
  }
  return queued
}
