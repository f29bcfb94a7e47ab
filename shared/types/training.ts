import type { EvidenceContentType, RetrainingReason } from '../schemas/training'
import type { CourseStanding } from '../utils/training-validity'

/** A course as the club has configured it. */
export interface CourseDto {
  id: string
  /** The stable code rules name it by (composite_ppe …); the name may change, the code does not. */
  code: string
  name: string
  description: string
  validityMonths: number
  /** The theory pass mark in percent, or null when the course has no theory test. */
  passMarkPercent: number | null
  practicalRequired: boolean
}

/** A member's latest passing record of a course, as their course list shows it. */
export interface LatestRecordDto {
  recordId: string
  trainedOn: string
  expiresOn: string
  takenElsewhere: boolean
  retrainingReason: RetrainingReason | null
}

/** A course with where the signed-in member stands in it (the one rule, courseStanding). */
export interface MyCourseDto extends CourseDto {
  standing: CourseStanding
  latest: LatestRecordDto | null
}

/** The caller's place in a session: enrolled, or waiting at `position` (1 = next to move up). */
export interface SessionPlaceDto {
  status: 'enrolled' | 'waiting'
  position: number | null
}

/** A scheduled session. Times are instants (ISO); pages show them in the club's time zone. */
export interface TrainingSessionDto {
  id: string
  course: { id: string, code: string, name: string, passMarkPercent: number | null, practicalRequired: boolean }
  instructorMembershipId: string
  instructorName: string
  startsAt: string
  endsAt: string
  place: string
  capacity: number
  enrolledCount: number
  waitingCount: number
  issuedAt: string | null
  mine: SessionPlaceDto | null
}

/** One trainee of a session, as the instructor sees them. */
export interface SessionParticipantDto {
  enrolmentId: string
  membershipId: string
  name: string
  status: 'enrolled' | 'waiting'
  /** The place on the waiting list (1 = next), null when enrolled. */
  position: number | null
  attended: boolean | null
  theoryScorePercent: number | null
  practicalSignedOff: boolean | null
  recordId: string | null
  result: 'pass' | 'fail' | null
}

/** A session with its trainees (only for instructors; null for everyone else). */
export interface TrainingSessionDetailDto extends TrainingSessionDto {
  participants: SessionParticipantDto[] | null
  timeZone: string
}

/** What issuing a session's records wrote. */
export interface IssueResultDto {
  issued: number
  passed: number
  failed: number
}

/** An evidence file behind a record (served only to the member, instructors and safety officers). */
export interface EvidenceDto {
  id: string
  membershipId: string
  recordId: string | null
  contentType: EvidenceContentType
  byteSize: number
  createdAt: string
  url: string
}

/** A training record with every field a record must hold. */
export interface TrainingRecordDto {
  id: string
  membershipId: string
  traineeName: string
  courseId: string
  courseCode: string
  subject: string
  trainedFrom: string
  trainedTo: string
  trainerName: string
  result: 'pass' | 'fail'
  theoryScorePercent: number | null
  practicalSignedOff: boolean | null
  expiresOn: string
  takenElsewhere: boolean
  retraining: { reason: RetrainingReason, note: string | null, flaggedAt: string } | null
  evidence: EvidenceDto[]
}

/** One member current in a course. */
export interface RosterRowDto {
  membershipId: string
  name: string
  trainedOn: string
  expiresOn: string
  standing: CourseStanding
}
