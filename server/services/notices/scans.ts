import { Club } from '../../models'
import { clubBaseUrl } from '../clubs'
import { enqueueNotice } from './notices'
import { proofsLapsingSoon } from '../vessels'
import { scanDuesReminders } from '../dues'

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

/** Runs every reminder scan for club `clubId` (or every club); returns how many notices were queued. */
export async function runNoticeScans(opts: { clubId?: string, now?: Date } = {}): Promise<number> {
  const clubs = await Club.findAll({ where: opts.clubId ? { id: opts.clubId } : {}, order: [['createdAt', 'ASC']] })
  let queued = 0
  for (const club of clubs) {
    queued += await scanDuesReminders(club, opts.now ?? new Date())
    queued += await scanClubProofLapsing(club, opts.now ?? new Date())
  }
  return queued
}
