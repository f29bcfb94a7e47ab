import { rm } from 'node:fs/promises'
import { QueryTypes, type Transaction } from 'sequelize'
import { Club, Membership, User } from '../../models'
import type { Actor } from '../../utils/auth'
import type { ImportRow } from '#shared/schemas/club-data'
import { recordAudit } from '../audit'
import { applyImportBatch, type BatchRow, type ImportCounts } from './apply'
import { importFilePath } from './jobs'
import { clubLookups, type ClubLookups } from './lookups'

/*
 * The import job runs wherever there is a server to run it:
 * - A server CLAIMS a job (queued, or running with its lease run out) with FOR UPDATE SKIP LOCKED,
 *   writing a fresh `claim_id` and a lease (`locked_until`), like the notice queue.
 * - It writes the rows in batches, one transaction each: the rows' writes, the staging rows marked
 *   done, the counts, and the lease renewed `WHERE claim_id = mine`. If that finds the claim gone
 *   (another server took the job after this one stalled past its lease), the transaction rolls back:
 *   a row is written exactly once, by whichever server holds the job.
 * - A server that stops mid-job leaves the lease to run out; the next sweep (at boot, every
 *   NUXT_IMPORT_SWEEP_SECONDS, or when the import page asks for the job) carries it on from the
 *   first row not done.
 * - At the end: one audit event with the counts, the staging rows and the file deleted.
 */

/** Rows written per transaction: small enough that progress moves every second, large enough to be quick. */
const RUN_BATCH = 500

function leaseSeconds(): number {
  return Math.max(1, Number(useRuntimeConfig().importLeaseSeconds) || 60)
}

class LostClaim extends Error {}

interface ClaimedJob { id: string, claim_id: string, club_id: string, created_by_membership_id: string }

/** Claims the next job a server may run now (SKIP LOCKED: never waits; outside the lock order of utils/locks.ts, holding no other lock). */
async function claimNextJob(): Promise<ClaimedJob | undefined> {
  const [job] = await useDb().query<ClaimedJob>(`
    UPDATE import_jobs SET status = 'running', claim_id = gen_random_uuid(), locked_until = now() + make_interval(secs => :lease),
      started_at = COALESCE(started_at, now()), updated_at = now()
    WHERE id = (
      SELECT id FROM import_jobs
      WHERE status IN ('queued', 'running') AND (locked_until IS NULL OR locked_until < now())
      ORDER BY created_at LIMIT 1
      FOR UPDATE SKIP LOCKED
    )
    RETURNING id, claim_id, club_id, created_by_membership_id`,
  { replacements: { lease: leaseSeconds() }, type: QueryTypes.SELECT })
  return job
}

/** The importing admin as the actor of the job's writes and audit events. */
async function jobActor(job: ClaimedJob): Promise<Actor> {
  const membership = await Membership.findByPk(job.created_by_membership_id)
  const [user, club] = await Promise.all([User.findByPk(membership!.userId), Club.findByPk(job.club_id)])
  return { user: user!, membership: membership!, club: club!, roles: ['admin'], status: 'active' }
}

interface StagingRow { line: number, email: string | null, outcome: string, row_values: ImportRow | null }

/**
 * Writes `rows` in `transaction`: the whole batch set-based (`applyImportBatch`), or with `oneByOne`
 * each row alone behind its own savepoint, so that a row the database refuses (a rule the dry run
 * could not see) is counted refused and the rest goes on.
 */
async function writeRows(job: ClaimedJob, actor: Actor, lookups: ClubLookups, rows: StagingRow[], oneByOne: boolean, transaction: Transaction): Promise<ImportCounts> {
  const checked: BatchRow[] = rows.filter(r => r.row_values).map(r => ({ line: r.line, row: r.row_values! }))
  const counts: ImportCounts = { created: 0, updated: 0, unchanged: 0, refused: rows.length - checked.length }
  const add = (c: ImportCounts) => {
    for (const k of Object.keys(counts) as (keyof ImportCounts)[]) counts[k] += c[k]
  }
  if (!oneByOne) {
    add(await applyImportBatch(actor, checked, lookups, transaction))
    return counts
  }
  for (const r of checked) {
    const one = await useDb().transaction({ transaction }, t => applyImportBatch(actor, [r], lookups, t)).catch((error: unknown) => {
      console.error(`[imports] job ${job.id} row ${r.line} refused by the database:`, (error as Error).message)
      return null
    })
    if (one) add(one)
    else counts.refused++
  }
  return counts
}

/**
 * Writes the next batch of claimed `job`; false when no row was left. A batch the database refuses
 * is written again row by row behind savepoints (set-based when all is well, exact when it is not).
 * Throws LostClaim when another server holds the job now.
 */
async function runBatch(job: ClaimedJob, actor: Actor, lookups: ClubLookups): Promise<boolean> {
  const attempt = (oneByOne: boolean) => useDb().transaction(async (transaction) => {
    const rows = await useDb().query<StagingRow>(
      'SELECT line, email, outcome, row_values FROM import_rows WHERE job_id = :id AND NOT done ORDER BY line LIMIT :n',
      { replacements: { id: job.id, n: RUN_BATCH }, type: QueryTypes.SELECT, transaction })
    if (!rows.length) return false
    const counts = await writeRows(job, actor, lookups, rows, oneByOne, transaction)
    await useDb().query('UPDATE import_rows SET done = true WHERE job_id = :id AND line IN (:lines)',
      { replacements: { id: job.id, lines: rows.map(r => r.line) }, transaction })
    const [kept] = await useDb().query<{ id: string }>(`
      UPDATE import_jobs SET rows_done = rows_done + :n, created_count = created_count + :created, updated_count = updated_count + :updated,
        unchanged_count = unchanged_count + :unchanged, refused_count = refused_count + :refused,
        locked_until = now() + make_interval(secs => :lease), updated_at = now()
      WHERE id = :id AND claim_id = :claim AND status = 'running' RETURNING id`,
    { replacements: { id: job.id, claim: job.claim_id, n: rows.length, ...counts, lease: leaseSeconds() }, type: QueryTypes.SELECT, transaction })
    if (!kept) throw new LostClaim()
    return true
  })
  try {
    return await attempt(false)
  }
  catch (error) {
    if (error instanceof LostClaim) throw error
    return attempt(true)
  }
}

/** Ends claimed `job` as `status` (done or failed): the import's audit event with its counts, then its staging rows and file deleted. */
async function endJob(job: ClaimedJob, actor: Actor, status: 'done' | 'failed', error: string | null): Promise<void> {
  await useDb().transaction(async (transaction) => {
    const [ended] = await useDb().query<{ total_rows: number, rows_done: number, created_count: number, updated_count: number, unchanged_count: number, refused_count: number }>(`
      UPDATE import_jobs SET status = :status, finished_at = now(), last_error = :error, claim_id = NULL, locked_until = NULL, updated_at = now()
      WHERE id = :id AND claim_id = :claim
      RETURNING total_rows, rows_done, created_count, updated_count, unchanged_count, refused_count`,
    { replacements: { id: job.id, claim: job.claim_id, status, error: error?.slice(0, 2000) ?? null }, type: QueryTypes.SELECT, transaction })
    if (!ended) throw new LostClaim()
    await recordAudit(actor, job.club_id, {
      action: 'club_data.import', subjectType: 'import_job', subjectId: job.id,
      after: {
        outcome: status, rows: ended.total_rows, done: ended.rows_done, created: ended.created_count,
        updated: ended.updated_count, unchanged: ended.unchanged_count, refused: ended.refused_count,
      },
    }, transaction)
    await useDb().query('DELETE FROM import_rows WHERE job_id = :id', { replacements: { id: job.id }, transaction })
  })
  await rm(importFilePath(await uploadsDir(), job.id), { force: true })
}

/** Runs claimed `job` to its end (or until another server takes it over). */
async function runJob(job: ClaimedJob): Promise<void> {
  const actor = await jobActor(job)
  try {
    const lookups = await clubLookups(job.club_id)
    while (await runBatch(job, actor, lookups));
    await endJob(job, actor, 'done', null)
  }
  catch (error) {
    if (error instanceof LostClaim) {
      console.error(`[imports] job ${job.id} was taken over by another server; this one stops`)
      return
    }
    console.error(`[imports] job ${job.id} failed:`, (error as Error).message)
    await endJob(job, actor, 'failed', `The import stopped: ${(error as Error).message}`).catch(() => {})
  }
}

let running: Promise<void> | null = null
let again = false

/**
 * Runs every import job this server may claim now, one after another, and returns when none is left.
 * A call while a run is going on asks it to look once more instead of starting a second run.
 */
export function runImportJobs(): Promise<void> {
  if (running) {
    again = true
    return running
  }
  running = (async () => {
    do {
      again = false
      for (let job = await claimNextJob(); job; job = await claimNextJob()) await runJob(job)
    } while (again)
  })().finally(() => {
    running = null
  })
  return running
}

/** Starts `runImportJobs` without waiting for it (after a request queued a job, or found one abandoned). */
export function kickImportJobs(): void {
  runImportJobs().catch(error => console.error('[imports] run failed:', (error as Error).message))
}
