import { z } from 'zod'
import { PageQuerySchema, isoDate, nameField } from './common'

/** Why a record is flagged "retraining required": the workshop changed, the PPE changed, or the skill was not kept. */
export const RETRAINING_REASONS = ['changed_workshop', 'changed_ppe', 'skill_not_retained'] as const
export type RetrainingReason = typeof RETRAINING_REASONS[number]

/** The file types evidence may be (judged from the content, never the name): PDFs kept as they are, images re-encoded. */
export const EVIDENCE_CONTENT_TYPES = ['application/pdf', 'image/jpeg', 'image/png'] as const
export type EvidenceContentType = typeof EVIDENCE_CONTENT_TYPES[number]

/** The largest evidence file taken, in bytes (10 MB); the upload stops reading beyond it (413). */
export const EVIDENCE_MAX_BYTES = 10 * 1024 * 1024

/** The most trainees one session takes (the table checks it too). */
export const SESSION_CAPACITY_MAX = 200

const uuid = (message: string) => z.string().uuid(message).transform(id => id.toLowerCase())

/** One printable line of 1–`max` characters (a place, a course name). */
const line = (max: number, required: string) => z.string().trim().min(1, required).max(max, `At most ${max} characters`)
  .superRefine((v, ctx) => {
    if (/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v)) ctx.addIssue({ code: 'custom', message: 'Use one line of visible characters' })
  })

/**
 * A wall-clock time in the club's time zone, as a datetime-local field gives it: YYYY-MM-DDTHH:mm.
 * The server turns it into an instant with the club's zone (summer time included).
 */
export const localDateTime = z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/, 'Use the form YYYY-MM-DDTHH:mm')
  .refine((v) => {
    // Refinements run after a failed pattern too: judge only what has the shape.
    if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/.test(v)) return true
    const [date, time] = v.split('T') as [string, string]
    const [h, m] = time.split(':').map(Number)
    return isoDate.safeParse(date).success && h! < 24 && m! < 60
  }, 'Not a date and time')

/** A course as the club edits it: name, description, validity, theory pass mark (none: no theory test), practical sign-off. */
export const CourseEditSchema = z.object({
  name: line(120, 'Name the course'),
  description: z.string().trim().max(2000, 'At most 2000 characters'),
  validityMonths: z.number({ invalid_type_error: 'A number of months' }).int('Whole months').min(1, 'At least 1 month').max(120, 'At most 120 months'),
  passMarkPercent: z.number({ invalid_type_error: 'A percentage' }).int('A whole percentage').min(0, 'At least 0').max(100, 'At most 100').nullable(),
  practicalRequired: z.boolean({ invalid_type_error: 'Yes or no' }),
}).strict()
export type CourseEdit = z.infer<typeof CourseEditSchema>

/** An instructor schedules a session: course, start and end (club's wall clock), place, capacity. */
export const SessionCreateSchema = z.object({
  courseId: uuid('Choose a course'),
  startsAt: localDateTime,
  endsAt: localDateTime,
  place: line(120, 'Say where the session is held'),
  capacity: z.number({ invalid_type_error: 'A number of places' }).int('Whole places').min(1, 'At least 1 place').max(SESSION_CAPACITY_MAX, `At most ${SESSION_CAPACITY_MAX} places`),
}).strict().superRefine((v, ctx) => {
  if (v.endsAt <= v.startsAt) ctx.addIssue({ code: 'custom', path: ['endsAt'], message: 'The session ends after it starts' })
})
export type SessionCreate = z.infer<typeof SessionCreateSchema>

/** One trainee's attendance and assessment, as the instructor records it. */
export const AttendanceEntrySchema = z.object({
  enrolmentId: uuid('Not a valid enrolment'),
  attended: z.boolean({ invalid_type_error: 'Yes or no' }),
  theoryScorePercent: z.number({ invalid_type_error: 'A percentage' }).int('A whole percentage').min(0, 'At least 0').max(100, 'At most 100').nullable(),
  practicalSignedOff: z.boolean({ invalid_type_error: 'Yes or no' }),
}).strict()

/** The attendance and assessment of a session's trainees (any of them, in one go). */
export const AttendanceSchema = z.object({
  entries: z.array(AttendanceEntrySchema).min(1, 'Record at least one trainee').max(SESSION_CAPACITY_MAX, `At most ${SESSION_CAPACITY_MAX} trainees`),
}).strict()
export type Attendance = z.infer<typeof AttendanceSchema>

/** Issuing a session's records is one step that cannot be undone: the page asks first and says so. */
export const IssueRecordsSchema = z.object({
  confirm: z.literal(true, { errorMap: () => ({ message: 'Confirm that the records are to be issued' }) }),
}).strict()

/** A flag on a record: it is not current until a new record is issued. */
export const RetrainingFlagSchema = z.object({
  reason: z.enum(RETRAINING_REASONS, { errorMap: () => ({ message: 'Choose changed workshop, changed PPE or skill not retained' }) }),
  note: z.string().trim().max(500, 'At most 500 characters').transform(v => (v === '' ? null : v)).nullable().optional(),
}).strict()
export type RetrainingFlag = z.infer<typeof RetrainingFlagSchema>

/** A course taken elsewhere, entered by an instructor with at least one evidence file already uploaded. */
export const ElsewhereRecordSchema = z.object({
  membershipId: uuid('Choose the member'),
  courseId: uuid('Choose a course'),
  trainedFrom: isoDate,
  trainedTo: isoDate,
  trainerName: nameField('Name the trainer and where the course was taken'),
  theoryScorePercent: z.number({ invalid_type_error: 'A percentage' }).int('A whole percentage').min(0, 'At least 0').max(100, 'At most 100').nullable().optional(),
  evidenceIds: z.array(uuid('Not a valid evidence id')).min(1, 'Upload the certificate or other evidence first').max(10, 'At most 10 files'),
}).strict().superRefine((v, ctx) => {
  if (v.trainedTo < v.trainedFrom) ctx.addIssue({ code: 'custom', path: ['trainedTo'], message: 'The last day is on or after the first' })
})
export type ElsewhereRecord = z.infer<typeof ElsewhereRecordSchema>

/** The text fields of an evidence upload (multipart, beside the file field `file`). */
export const EvidenceUploadFieldsSchema = z.object({
  membershipId: uuid('Choose the member'),
  recordId: uuid('Not a valid record').optional(),
}).strict()
export type EvidenceUploadFields = z.infer<typeof EvidenceUploadFieldsSchema>

/** Which sessions to list: those still to come (default) or those of the last 90 days. */
export const SessionListQuerySchema = z.object({
  when: z.enum(['upcoming', 'past']).default('upcoming'),
})

/** Whose records: the caller's own unless an officer names a member. */
export const RecordListQuerySchema = z.object({
  membershipId: uuid('Not a valid member').optional(),
})

/** A course's roster, a page at a time. */
export const RosterQuerySchema = PageQuerySchema
