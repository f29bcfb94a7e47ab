import { Club } from '../../models'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice } from './notices'
import { proofsLapsingSoon } from '../vessels'
import { trainingRecordsExpiringSoon } from '../training'
import { scanDuesReminders } from '../dues'
import { tiersExpiringSoon } from '../tiers'

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

/**
 * Queues a `tier_expiring` notice for every tier (neither suspended nor revoked) that expires within
 * 60 days: the 60-, 30- and 7-day warnings, each once. The subject is the held tier, the due date its
 * expiry minus the warning's days, so a rerun queues nothing and a renewal (a new expiry) starts
 * again. Safety: nobody can opt out. Returns how many it queued.
 */
async function scanClubTierExpiring(club: Club, now: Date): Promise<number> {
  let queued = 0
  for (const t of await tiersExpiringSoon(club.id, clubToday(club, now))) {
    const added = await enqueueNotice({
      clubId: club.id,
      membershipId: t.membershipId,
      kind: 'tier_expiring',
      subjectKey: t.memberTierId,
      dueOn: addCalendarDays(t.expiresOn, -t.daysBefore),
      toEmail: t.email,
      vars: { clubName: club.name, memberName: t.name, baseUrl: clubBaseUrl(club), tierCode: t.tierCode, tierName: t.tierName, expiresOn: t.expiresOn, daysBefore: t.daysBefore },
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
    queued += await scanDuesReminders(club, opts.now ?? new Date())
    queued += await scanClubProofLapsing(club, opts.now ?? new Date())
    queued += await scanClubTrainingExpiring(club, opts.now ?? new Date())
    queued += await scanClubTierExpiring(club, opts.now ?? new Date())
  }
  return queued
}
