import type { ImportIssue, ImportMapping } from '../schemas/club-data'
import type { ImportField } from '../utils/import-fields'

/** Where an import job stands: uploaded → checked (dry run done) → queued → running → done; or failed / cancelled. */
export type ImportJobStatus = 'uploaded' | 'checked' | 'queued' | 'running' | 'done' | 'failed' | 'cancelled'

/** What the dry run found a row will do. */
export type ImportOutcome = 'create' | 'update' | 'unchanged' | 'refused'

/** One row shown by the dry run: its line in the file, the member it names and what it will do (with the refusals). */
export interface ImportRowDto {
  line: number
  outcome: ImportOutcome
  name: string
  email: string
  issues: ImportIssue[]
}

/** An import job as the import page shows it (GET /api/imports/:id). */
export interface ImportJobDto {
  id: string
  status: ImportJobStatus
  fileBytes: number
  /** The file's first row, as written. */
  headings: string[]
  /** The first rows of the file after the headings, as written (the mapping step's preview). */
  preview: string[][]
  /** The mapping the server guessed from the headings, or the one the admin chose. */
  mapping: ImportMapping | null
  suggested: Partial<Record<ImportField, number>>
  /** The dry run's counts (null until it ran). */
  dryRun: { total: number, create: number, update: number, unchanged: number, refused: number } | null
  /** The first rows of each outcome, from the dry run (while its rows are kept). */
  rows: ImportRowDto[]
  /** The run: rows done of total, what they did, time left in seconds (null while unknown). */
  progress: { done: number, total: number, created: number, updated: number, unchanged: number, refused: number, secondsLeft: number | null }
  startedAt: string | null
  finishedAt: string | null
  error: string | null
}
