import { z } from 'zod'
import { INCIDENT_KINDS, INCIDENT_STATUSES } from '../utils/incident-words'

const textLine = (max: number, required: string) => z.string({ required_error: required, invalid_type_error: required })
  .trim().min(1, required).max(max, `At most ${max} characters`)
  .refine(v => !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v), 'Use one line of visible characters')
const longText = (max: number, required?: string) => {
  const base = z.string({ invalid_type_error: 'Text, please', required_error: required ?? 'Text, please' }).trim()
  return (required ? base.min(1, required) : base).max(max, `At most ${max} characters`)
    .refine(v => !/[\p{Cc}\p{Cf}]/u.test(v.replace(/[\n\t]/g, '')), 'Use visible characters only')
}
const uuid = (message: string) => z.string({ invalid_type_error: message, required_error: message }).uuid(message).transform(id => id.toLowerCase())

/** The longest text of a report or a review field (the incidents table checks it too). */
export const INCIDENT_TEXT_MAX = 5000

/**
 * A member's incident report: the kind, when (an instant, not in the future: the server checks) and
 * where, optionally the launch event and the vessel (by its tag, any vessel of the club), the members
 * involved, what happened and — for an injury only — the personal details of it.
 */
export const IncidentReportSchema = z.object({
  kind: z.enum(INCIDENT_KINDS, { errorMap: () => ({ message: 'Choose what kind of incident it was' }) }),
  happenedAt: z.string({ required_error: 'Say when it happened', invalid_type_error: 'Say when it happened' }).datetime({ offset: true, message: 'Say when it happened (date and time)' }),
  place: textLine(200, 'Say where it happened'),
  eventId: uuid('Not a launch event').nullable().optional(),
  vesselTag: z.string({ invalid_type_error: 'Type the vessel\'s tag' }).trim().toUpperCase().max(20, 'At most 20 characters')
    .regex(/^([A-Z]{2,5}-\d{1,7})?$/, 'A tag looks like ABC-0042').transform(v => v || null).nullable().optional(),
  peopleIds: z.array(uuid('Not a member')).max(20, 'At most 20 people').default([]).transform(ids => [...new Set(ids)]),
  whatHappened: longText(INCIDENT_TEXT_MAX, 'Say what happened'),
  injuryDetails: longText(INCIDENT_TEXT_MAX).nullable().optional().transform(v => v || null),
}).strict().superRefine((v, ctx) => {
  if (v.injuryDetails && v.kind !== 'injury') ctx.addIssue({ code: 'custom', path: ['injuryDetails'], message: 'Personal details of an injury belong to an injury report only' })
})
export type IncidentReportInput = z.infer<typeof IncidentReportSchema>

/** The safety officer's review: notes, findings and actions (each replaced as given). */
export const IncidentReviewSchema = z.object({
  reviewNotes: longText(INCIDENT_TEXT_MAX).optional(),
  findings: longText(INCIDENT_TEXT_MAX).optional(),
  actions: longText(INCIDENT_TEXT_MAX).optional(),
}).strict().refine(v => v.reviewNotes !== undefined || v.findings !== undefined || v.actions !== undefined, { message: 'Change the notes, findings or actions', path: ['reviewNotes'] })
export type IncidentReviewInput = z.infer<typeof IncidentReviewSchema>

/** Closing an incident: the outcome in one line, for the audit trail and the reporter's e-mail. */
export const IncidentCloseSchema = z.object({
  outcome: textLine(500, 'Say how the incident was closed'),
}).strict()
export type IncidentCloseInput = z.infer<typeof IncidentCloseSchema>

/** Suspending a tier of a person involved, from the incident page. */
export const IncidentSuspensionSchema = z.object({
  membershipId: uuid('Choose a person involved'),
  rank: z.number({ required_error: 'Choose the tier', invalid_type_error: 'Choose the tier' }).int('Choose the tier').min(0, 'Choose the tier').max(4, 'Choose the tier'),
  reason: textLine(500, 'Say why the tier is suspended'),
}).strict()
export type IncidentSuspensionInput = z.infer<typeof IncidentSuspensionSchema>

/** The incident list, newest first, server-paged, optionally one status and one person involved. */
export const IncidentListQuerySchema = z.object({
  status: z.enum(INCIDENT_STATUSES).optional().catch(undefined),
  person: z.string().uuid().transform(id => id.toLowerCase()).optional().catch(undefined),
  page: z.coerce.number().int().min(1).max(100_000).default(1).catch(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25).catch(25),
})
export type IncidentListQuery = z.infer<typeof IncidentListQuerySchema>

/** The shortest name part the report form searches for (fewer letters would list half the club). */
export const INCIDENT_PEOPLE_QUERY_MIN = 2

/** The report form's search for the people involved: part of a member's name. */
export const IncidentPeopleQuerySchema = z.object({
  q: z.string({ required_error: 'Type part of a name', invalid_type_error: 'Type part of a name' }).trim()
    .min(INCIDENT_PEOPLE_QUERY_MIN, `Type at least ${INCIDENT_PEOPLE_QUERY_MIN} letters of the name`).max(80, 'At most 80 characters')
    .refine(v => !/[\p{Cc}\p{Cf}]/u.test(v), 'Use visible characters only'),
})
export type IncidentPeopleQuery = z.infer<typeof IncidentPeopleQuerySchema>
