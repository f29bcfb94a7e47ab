import { z } from 'zod'
import { addCalendarDays, addCalendarMonths } from '../utils/dates'
import { isoDate } from './common'

/** The longest period one evidence pack covers: five years of the club's records. */
export const EVIDENCE_PACK_MAX_DAYS = 5 * 366

/** An empty query value (a cleared date) means "the default". */
const blankToUndefined = (v: unknown) => (v === '' ? undefined : v)

const daysBetween = (from: string, to: string) => (Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000

/**
 * The evidence pack's period, both ends inclusive (YYYY-MM-DD in the club's calendar). Either end may
 * be left out: the server fills in the last 12 months up to the club's today.
 */
export const EvidencePackQuerySchema = z.object({
  from: z.preprocess(blankToUndefined, isoDate.optional()),
  to: z.preprocess(blankToUndefined, isoDate.optional()),
}).superRefine((q, ctx) => {
  if (!q.from || !q.to) return
  if (q.from > q.to) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The period ends before it starts' })
  else if (daysBetween(q.from, q.to) > EVIDENCE_PACK_MAX_DAYS) ctx.addIssue({ code: 'custom', path: ['to'], message: 'A pack covers at most five years' })
})
export type EvidencePackQuery = z.infer<typeof EvidencePackQuerySchema>

/**
 * The period a pack covers on the club's `today`: both ends as asked; without an end, today (or the
 * start, when that is later); without a start, the 12 months up to the end.
 */
export function evidencePackPeriod(q: EvidencePackQuery, today: string): { from: string, to: string } {
  const to = q.to ?? (q.from && q.from > today ? q.from : today)
  return { from: q.from ?? addCalendarDays(addCalendarMonths(to, -12), 1), to }
}
