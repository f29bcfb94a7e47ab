import { open, rename, rm } from 'node:fs/promises'
import { join } from 'node:path'
import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { checkImportRow, IMPORT_MAX_COLUMNS, IMPORT_MAX_ROWS, issuesText, type ImportIssue, type ImportMapping, type ImportRow } from '#shared/schemas/club-data'
import { mappedCells, suggestMapping } from '#shared/utils/import-fields'
import type { ImportJobDto, ImportJobStatus, ImportOutcome, ImportRowDto } from '#shared/types/club-data'
import { csvHead, csvRows, toCsv } from './csv'
import { clubLookups, lookupIssues, membersByEmail } from './lookups'
import { planRow, type AppliedOutcome, type MemberPlans } from './apply'

/** Rows of the file shown on the mapping step. */
export const PREVIEW_ROWS = 5
/** Rows of each outcome the dry run shows (the refused ones all download). */
const SHOWN_ROWS = 20
/** The dry run's word for what the run will do with a row. */
const DRY_OUTCOMES: Record<AppliedOutcome | 'refused', ImportOutcome> = { created: 'create', updated: 'update', unchanged: 'unchanged', refused: 'refused' }
const OWN_MEMBERSHIP: ImportIssue = { field: 'email', reason: 'This is your own membership: an import never changes it' }
/** Staging rows written per statement. */
const DRY_RUN_BATCH = 500

/** The private file of import `id` in the uploads folder `dir` (named by the job, never by the client). */
export function importFilePath(dir: string, id: string): string {
  return join(dir, `import-${id}.csv`)
}

export interface ImportJobRow {
  id: string
  club_id: string
  created_by_membership_id: string
  status: ImportJobStatus
  file_bytes: string
  headings: string[]
  preview: string[][]
  mapping: ImportMapping | null
  total_rows: number
  dry_create: number
  dry_update: number
  dry_unchanged: number
  dry_refused: number
  rows_done: number
  created_count: number
  updated_count: number
  unchanged_count: number
  refused_count: number
  locked_until: Date | null
  started_at: Date | null
  finished_at: Date | null
  last_error: string | null
  now: Date
}

/** Import job `id` of the actor's club, or 404. */
export async function findImportJob(actor: Actor, id: string): Promise<ImportJobRow> {
  const [job] = await useDb().query<ImportJobRow>('SELECT *, now() AS now FROM import_jobs WHERE id = :id AND club_id = :clubId',
    { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!job) notFound('No such import')
  return job
}

/** Why the first 64 KB of `path` are not a UTF-8 text file, or null. */
async function notTextReason(path: string): Promise<string | null> {
  const file = await open(path, 'r')
  try {
    const buffer = Buffer.alloc(64 * 1024)
    const { bytesRead } = await file.read(buffer, 0, buffer.length, 0)
    const head = buffer.subarray(0, bytesRead)
    if (head.includes(0)) return 'This is not a CSV file: save the sheet as "CSV UTF-8" and upload that.'
    // A character cut at the 64 KB edge is not an error; anything earlier is another encoding.
    const text = new TextDecoder('utf-8', { fatal: false }).decode(head.subarray(0, Math.max(0, bytesRead - 4)))
    if (text.includes('\uFFFD')) return 'The file is not UTF-8: save the sheet as "CSV UTF-8" and upload it again.'
    return null
  }
  finally {
    await file.close()
  }
}

/**
 * Keeps an uploaded roster (the temporary file at `uploadPath`, which the caller deletes) as a new
 * import job of the actor's club: the file moved to its private name, its headings and first rows
 * read for the mapping step. 422 when it is not a UTF-8 CSV file with headings.
 */
export async function createImportJob(actor: Actor, uploadPath: string, dir: string, bytes: number): Promise<ImportJobDto> {
  const reason = await notTextReason(uploadPath)
  if (reason) refuse({ code: 'NOT_CSV', message: reason })
  const { shape, headings, preview } = await csvHead(uploadPath, PREVIEW_ROWS)
  if (!headings.some(h => h.trim())) refuse({ code: 'NO_HEADINGS', message: 'The file\'s first row should name its columns; it is empty.' })
  if (headings.length >= IMPORT_MAX_COLUMNS) refuse({ code: 'TOO_MANY_COLUMNS', message: `A roster has at most ${IMPORT_MAX_COLUMNS - 1} columns.` })
  const [job] = await useDb().query<{ id: string }>(`
    INSERT INTO import_jobs (club_id, created_by_membership_id, file_bytes, delimiter, headings, preview)
    VALUES (:clubId, :me, :bytes, :delimiter, :headings, :preview) RETURNING id`,
  { replacements: { clubId: actor.club.id, me: actor.membership.id, bytes, delimiter: shape.delimiter, headings: JSON.stringify(headings), preview: JSON.stringify(preview) }, type: QueryTypes.SELECT })
  await rename(uploadPath, importFilePath(dir, job!.id))
  return importJobDto(actor, job!.id)
}

interface StagedRow { line: number, cells: string[], email: string | null, outcome: ImportOutcome, issues: ImportIssue[], values: ImportRow | null }

/**
 * The dry run of import `id` with `mapping`: every row of the file read (streamed) and checked with
 * the forms' schemas and the club's plans, courses and tiers, then compared with the member its
 * e-mail names — create, update, unchanged or refused — and kept as staging rows. Nothing else is
 * written. May run again with another mapping until the import starts.
 */
export async function dryRunImport(actor: Actor, id: string, mapping: ImportMapping, dir: string): Promise<ImportJobDto> {
  const job = await findImportJob(actor, id)
  if (job.status !== 'uploaded' && job.status !== 'checked') refuse({ code: 'IMPORT_STARTED', message: 'This import has started; upload the file again to check it anew.' })
  const db = useDb()
  await db.query('DELETE FROM import_rows WHERE job_id = :id', { replacements: { id } })
  const lookups = await clubLookups(actor.club.id)
  const today = clubToday(actor.club)
  const ownEmail = actor.user.email.toLowerCase()
  const plans: MemberPlans = new Map()
  const counts = { create: 0, update: 0, unchanged: 0, refused: 0 }
  let batch: StagedRow[] = []
  let line = 0

  const flush = async () => {
    const valid = batch.filter(r => r.values)
    const members = await membersByEmail(actor.club.id, [...new Set(valid.map(r => r.email!).filter(e => !plans.has(e)))])
    // A later row of the same e-mail is compared with the member as the rows before it leave them.
    for (const r of valid) {
      const outcome = planRow(plans, r.values!, members.get(r.email!), actor.membership.id, lookups)
      if (outcome === 'refused') Object.assign(r, { values: null, issues: [OWN_MEMBERSHIP] })
      r.outcome = DRY_OUTCOMES[outcome]
    }
    for (const r of batch) counts[r.outcome]++
    await db.query(`
      INSERT INTO import_rows (job_id, line, cells, email, outcome, issues, row_values)
      SELECT :id, x.line, x.cells, x.email, x.outcome, x.issues, x.row_values
      FROM jsonb_to_recordset(:rows::jsonb) AS x(line integer, cells jsonb, email text, outcome text, issues jsonb, row_values jsonb)`,
    { replacements: { id, rows: JSON.stringify(batch.map(r => ({ line: r.line, cells: r.cells, email: r.email, outcome: r.outcome, issues: r.issues, row_values: r.values }))) } })
    batch = []
  }

  for await (const cells of csvRows(importFilePath(dir, id))) {
    line++
    if (line === 1) continue
    if (line - 1 > IMPORT_MAX_ROWS) refuse({ code: 'TOO_MANY_ROWS', message: `One import reads at most ${IMPORT_MAX_ROWS} rows: split the file.` })
    batch.push(stageRow(line, cells, mapping, today, ownEmail, lookups))
    if (batch.length >= DRY_RUN_BATCH) await flush()
  }
  if (batch.length) await flush()
  const total = Math.max(0, line - 1)
  await db.query(`UPDATE import_jobs SET status = 'checked', mapping = :mapping, total_rows = :total, dry_create = :create,
    dry_update = :update, dry_unchanged = :unchanged, dry_refused = :refused, updated_at = now() WHERE id = :id`,
  { replacements: { id, mapping: JSON.stringify(mapping), total, ...counts } })
  return importJobDto(actor, id)
}

/** One file row checked on its own (the member it names is looked up by the batch). */
function stageRow(line: number, cells: string[], mapping: ImportMapping, today: string, ownEmail: string, lookups: Awaited<ReturnType<typeof clubLookups>>): StagedRow {
  const checked = checkImportRow(cells, mapping.columns, mapping.dateFormat, today)
  const email = 'row' in checked ? checked.row.email : (mappedCells(cells, mapping.columns).email || '').toLowerCase() || null
  let issues = 'issues' in checked ? checked.issues : lookupIssues(checked.row, lookups)
  // The admin's own membership is never changed by an import: their roles and dues stay theirs to change by hand.
  if (!issues.length && email === ownEmail) issues = [OWN_MEMBERSHIP]
  if (issues.length) return { line, cells, email, outcome: 'refused', issues, values: null }
  return { line, cells, email, outcome: 'create', issues: [], values: (checked as { row: ImportRow }).row }
}

/** The job as the import page shows it, with time left estimated from the rows done so far. */
export async function importJobDto(actor: Actor, id: string): Promise<ImportJobDto> {
  const job = await findImportJob(actor, id)
  const rows = await useDb().query<{ line: number, outcome: ImportOutcome, cells: string[], issues: ImportIssue[] }>(`
    SELECT line, outcome, cells, issues FROM (
      SELECT line, outcome, cells, issues, row_number() OVER (PARTITION BY outcome ORDER BY line) AS n FROM import_rows WHERE job_id = :id
    ) r WHERE n <= :shown ORDER BY line`, { replacements: { id, shown: SHOWN_ROWS }, type: QueryTypes.SELECT })
  const columns = job.mapping?.columns ?? {}
  const rowDtos: ImportRowDto[] = rows.map((r) => {
    const raw = mappedCells(r.cells, columns)
    return { line: r.line, outcome: r.outcome, name: raw.name ?? '', email: raw.email ?? '', issues: r.issues }
  })
  const checked = job.status !== 'uploaded'
  const elapsed = job.started_at ? (job.now.getTime() - job.started_at.getTime()) / 1000 : 0
  const left = job.total_rows - job.rows_done
  return {
    id: job.id,
    status: job.status,
    fileBytes: Number(job.file_bytes),
    headings: job.headings,
    preview: job.preview,
    mapping: job.mapping,
    suggested: suggestMapping(job.headings),
    dryRun: checked ? { total: job.total_rows, create: job.dry_create, update: job.dry_update, unchanged: job.dry_unchanged, refused: job.dry_refused } : null,
    rows: rowDtos,
    progress: {
      done: job.rows_done,
      total: job.total_rows,
      created: job.created_count,
      updated: job.updated_count,
      unchanged: job.unchanged_count,
      refused: job.refused_count,
      secondsLeft: job.status === 'done' ? 0 : job.rows_done > 0 && elapsed > 0 ? Math.ceil((elapsed / job.rows_done) * left) : null,
    },
    startedAt: job.started_at?.toISOString() ?? null,
    finishedAt: job.finished_at?.toISOString() ?? null,
    error: job.last_error,
  }
}

/** The refused rows of import `id` as CSV: the file's headings and cells as written, plus a reason column. */
export async function refusedRowsCsv(actor: Actor, id: string): Promise<string> {
  const job = await findImportJob(actor, id)
  if (job.status === 'uploaded') refuse({ code: 'NOT_CHECKED', message: 'Run the dry run first.' })
  const rows = await useDb().query<{ line: number, cells: string[], issues: ImportIssue[] }>(
    `SELECT line, cells, issues FROM import_rows WHERE job_id = :id AND outcome = 'refused' ORDER BY line`,
    { replacements: { id }, type: QueryTypes.SELECT })
  const width = Math.max(job.headings.length, ...rows.map(r => r.cells.length))
  const pad = (cells: string[]) => Array.from({ length: width }, (_, i) => cells[i] ?? '')
  return toCsv([[...pad(job.headings), 'reason'], ...rows.map(r => [...pad(r.cells), `Row ${r.line}: ${issuesText(r.issues)}`])])
}

/** Queues checked import `id` to run (the job runner takes it at once). 422 unless it was checked and not started. */
export async function startImport(actor: Actor, id: string): Promise<void> {
  const [updated] = await useDb().query<{ id: string }>(`UPDATE import_jobs SET status = 'queued', updated_at = now()
    WHERE id = :id AND club_id = :clubId AND status = 'checked' RETURNING id`,
  { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!updated) {
    const job = await findImportJob(actor, id)
    refuse({ code: job.status === 'uploaded' ? 'NOT_CHECKED' : 'IMPORT_STARTED', message: job.status === 'uploaded' ? 'Run the dry run first.' : 'This import has already started.' })
  }
}

/** Drops import `id` before it starts: its file and staging rows are deleted. 422 once it has started. */
export async function cancelImport(actor: Actor, id: string, dir: string): Promise<void> {
  const [updated] = await useDb().query<{ id: string }>(`UPDATE import_jobs SET status = 'cancelled', finished_at = now(), updated_at = now()
    WHERE id = :id AND club_id = :clubId AND status IN ('uploaded', 'checked') RETURNING id`,
  { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!updated) {
    await findImportJob(actor, id)
    refuse({ code: 'IMPORT_STARTED', message: 'This import has started or ended; it can no longer be cancelled.' })
  }
  await useDb().query('DELETE FROM import_rows WHERE job_id = :id', { replacements: { id } })
  await rm(importFilePath(dir, id), { force: true })
}
