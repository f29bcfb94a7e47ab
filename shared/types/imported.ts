import type { TierRank } from '../utils/tier-rules'

/** A training record brought in by a roster import, waiting for an instructor to confirm it. */
export interface UnconfirmedRecordDto {
  id: string
  membershipId: string
  memberName: string
  courseCode: string
  courseName: string
  trainedFrom: string
  trainedTo: string
  trainerName: string
  result: 'pass' | 'fail'
  expiresOn: string
  /** When the import wrote it (ISO). */
  importedAt: string
}

/** A pressure tier brought in by a roster import, waiting for a qualified assessor to confirm it. */
export interface UnconfirmedTierDto {
  id: string
  membershipId: string
  memberName: string
  rank: TierRank
  code: string
  name: string
  firstGrantedOn: string
  signedOn: string
  expiresOn: string
  /** The assessor the imported file names (free text), if any. */
  importedAssessorName: string | null
  /** When the import last wrote it (ISO). */
  importedAt: string
  /** Why the caller may not confirm it (the usual assessor rules), or null when they may. */
  problem: string | null
}

/** Imported members still to be welcomed: no password yet and no welcome e-mail queued. */
export interface WelcomeWaitingDto { waiting: number }

/** The outcome of "send the welcome": e-mails queued now, and how many still wait (normally 0). */
export interface WelcomeSentDto { queued: number, waiting: number }
