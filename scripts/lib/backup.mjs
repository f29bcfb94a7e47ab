// Backups that restore: what `npm run backup` and `npm run restore` share (decision 0047). A backup is
// a folder named after its time holding the database in pg_dump's custom format, the uploads folder as
// a tar.gz and a manifest; the pure parts (versions, names, times) are exported for the unit tests.
import { execFileSync, spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { createReadStream, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { isAbsolute, join, resolve } from 'node:path'
import pg from 'pg'
import * as tar from 'tar'
import { ROOT } from './config.mjs'

/** The files of a backup folder. */
export const BACKUP_FILES = { database: 'database.dump', uploads: 'uploads.tar.gz', manifest: 'manifest.json' }
/** The manifest's format; a restore refuses one it does not know. */
export const MANIFEST_FORMAT = 1
const FOLDER_NAME = /^hoopwise-\d{4}-\d\d-\d\dT\d\d-\d\d-\d\dZ$/

/** Why a backup or a restore stops; the commands print its message alone (no stack). */
export class BackupError extends Error {}

/**
 * The settings of both commands, from the environment (a line in .env counts as if it were there):
 * HOOPWISE_BACKUP_DIR (default `.local/backups`), HOOPWISE_BACKUP_KEEP (default 7),
 * HOOPWISE_BACKUP_AT (a time of day for `npm start`'s nightly backup; empty: none),
 * HOOPWISE_PG_BIN (the folder of pg_dump and pg_restore; default Debian's for the server's version) and
 * NUXT_UPLOADS_DIR (the server's uploads folder). Relative folders are taken from the project folder,
 * where `npm start` runs the server.
 * @param {Record<string, string | undefined>} env
 */
export function backupSettings(env) {
  const keep = Number(env.HOOPWISE_BACKUP_KEEP || 7)
  if (!Number.isInteger(keep) || keep < 1) throw new BackupError(`HOOPWISE_BACKUP_KEEP must be a whole number of at least 1 (it is "${env.HOOPWISE_BACKUP_KEEP}")`)
  const at = env.HOOPWISE_BACKUP_AT?.trim() || ''
  if (at) parseTimeOfDay(at)
  const fromRoot = path => (isAbsolute(path) ? path : resolve(ROOT, path))
  return {
    backupsDir: fromRoot(env.HOOPWISE_BACKUP_DIR || '.local/backups'),
    keep,
    at,
    pgBin: env.HOOPWISE_PG_BIN || '',
    uploadsDir: fromRoot(env.NUXT_UPLOADS_DIR || '.local/uploads'),
  }
}

/** The major version in a client's `--version` line ("pg_dump (PostgreSQL) 15.10 (Debian …)" → 15), or null. */
export function parseClientMajor(versionLine) {
  const m = /\(PostgreSQL\)\s+(\d+)/.exec(versionLine)
  return m ? Number(m[1]) : null
}

/**
 * Why `tool` at major `clientMajor` must not work on a server at `serverMajor`, in words, or null when
 * they match. Only the same major is accepted: an older pg_dump cannot read a newer server, and a
 * newer one writes a dump that an older server's pg_restore may not read.
 */
export function clientMismatch({ tool, clientMajor, serverMajor }) {
  if (clientMajor === serverMajor) return null
  const client = clientMajor === null ? `${tool} of an unknown version` : `${tool} ${clientMajor}`
  return `The database server runs PostgreSQL ${serverMajor} but ${client} is the PostgreSQL client here; `
    + `they must be the same major version. Install the matching client (on Debian: sudo apt-get install postgresql-client-${serverMajor}) `
    + `or point HOOPWISE_PG_BIN at its bin folder (e.g. /usr/lib/postgresql/${serverMajor}/bin).`
}

/** "02:30" → { hours: 2, minutes: 30 }; anything else throws in words. */
export function parseTimeOfDay(text) {
  const m = /^([01]?\d|2[0-3]):([0-5]\d)$/.exec(text)
  if (!m) throw new BackupError(`HOOPWISE_BACKUP_AT must be a time of day such as 02:30 (it is "${text}")`)
  return { hours: Number(m[1]), minutes: Number(m[2]) }
}

/** Milliseconds from `now` to the next `timeOfDay` ("HH:MM", this machine's time zone); a full day when it is now. */
export function msUntilNext(timeOfDay, now = new Date()) {
  const { hours, minutes } = parseTimeOfDay(timeOfDay)
  const next = new Date(now)
  next.setHours(hours, minutes, 0, 0)
  if (next <= now) next.setDate(next.getDate() + 1)
  return next.getTime() - now.getTime()
}

/** A backup folder's name for the time `at` (UTC, sorts by time): hoopwise-2026-12-03T02-30-00Z. */
export function backupFolderName(at) {
  return `hoopwise-${at.toISOString().slice(0, 19).replaceAll(':', '-')}Z`
}

/** Which of the folder names `names` to delete so that the newest `keep` backups remain (others' folders are never touched). */
export function backupsToPrune(names, keep) {
  return names.filter(n => FOLDER_NAME.test(n)).sort().slice(0, -keep)
}

/** The folder of the PostgreSQL client tools for a server at `serverMajor`: HOOPWISE_PG_BIN, else Debian's for that version, else the newest installed. */
export function clientBinDir(serverMajor, pgBin = '') {
  if (pgBin) return pgBin
  const base = '/usr/lib/postgresql'
  const same = join(base, String(serverMajor), 'bin')
  if (existsSync(join(same, 'pg_dump'))) return same
  const installed = existsSync(base) ? readdirSync(base).filter(v => existsSync(join(base, v, 'bin', 'pg_dump'))).sort((a, b) => Number(b) - Number(a)) : []
  if (!installed.length) {
    throw new BackupError(`pg_dump is missing. Install the PostgreSQL ${serverMajor} client (on Debian: sudo apt-get install postgresql-client-${serverMajor}).`)
  }
  return join(base, installed[0], 'bin')
}

/** Checks that `tool` in `binDir` is of the server's major version; returns the tool's path, or throws the mismatch in words. */
export function checkClient(binDir, tool, serverMajor) {
  const path = join(binDir, tool)
  let line
  try {
    line = execFileSync(path, ['--version'], { encoding: 'utf8' }).trim()
  }
  catch {
    throw new BackupError(`${path} does not run. Install the PostgreSQL ${serverMajor} client (on Debian: sudo apt-get install postgresql-client-${serverMajor}).`)
  }
  const mismatch = clientMismatch({ tool, clientMajor: parseClientMajor(line), serverMajor })
  if (mismatch) throw new BackupError(mismatch)
  return path
}

/** The server's major version (15 for 15.10) on an open pg client. */
export async function serverMajorOf(client) {
  const { rows } = await client.query('SHOW server_version_num')
  return Math.floor(Number(rows[0].server_version_num) / 10_000)
}

/** The number of rows of every table in the public schema, by table name, as the open `client` sees them. */
export async function tableRowCounts(client) {
  const { rows: tables } = await client.query(`SELECT tablename FROM pg_tables WHERE schemaname = 'public' ORDER BY tablename`)
  const counts = {}
  for (const { tablename } of tables) {
    const { rows } = await client.query(`SELECT count(*)::bigint AS n FROM public.${client.escapeIdentifier(tablename)}`)
    counts[tablename] = Number(rows[0].n)
  }
  return counts
}

/**
 * Runs a PostgreSQL client tool on the database at `url`; rejects with its own error lines when it
 * fails. The password goes in PGPASSWORD, never on the command line where `ps` would show it.
 */
function runTool(path, args, url) {
  const target = new URL(url)
  const password = decodeURIComponent(target.password)
  target.password = ''
  return new Promise((resolveRun, reject) => {
    const env = { ...process.env, LC_ALL: 'C.UTF-8', ...(password ? { PGPASSWORD: password } : {}) }
    const child = spawn(path, [...args, `--dbname=${target}`], { stdio: ['ignore', 'ignore', 'pipe'], env })
    let stderr = ''
    child.stderr.on('data', (d) => {
      stderr = (stderr + d).slice(-4000)
    })
    child.once('error', reject)
    child.once('exit', code => (code === 0 ? resolveRun() : reject(new BackupError(`${path} failed (exit ${code}):\n${stderr.trim()}`))))
  })
}

/** The SHA-256 of a file, in hex. */
export async function sha256Of(path) {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path)) hash.update(chunk)
  return hash.digest('hex')
}

/** The files under `dir` (relative paths) and their total size. */
function folderSummary(dir) {
  let files = 0
  let bytes = 0
  const walk = (d) => {
    for (const entry of readdirSync(d, { withFileTypes: true })) {
      if (entry.isDirectory()) walk(join(d, entry.name))
      else if (entry.isFile()) {
        files++
        bytes += statSync(join(d, entry.name)).size
      }
    }
  }
  if (existsSync(dir)) walk(dir)
  return { files, bytes }
}

/** Whether `dir` holds anything. */
export function folderHasFiles(dir) {
  return existsSync(dir) && readdirSync(dir).length > 0
}

/**
 * Writes one backup into a new dated folder under `backupsDir` and deletes the oldest beyond `keep`.
 * The row counts and the dump read one snapshot (pg_export_snapshot), so the manifest describes exactly
 * the dump; the uploads are packed after the dump, so every photo row in it has its file. The folder is
 * written under a ".partial" name and renamed when complete: a crash never leaves a backup that looks whole.
 * Returns { folder, manifest, pruned }.
 */
export async function createBackup({ ownerUrl, appUrl, uploadsDir, backupsDir, keep, pgBin = '', appVersion, now = new Date(), log = console.log }) {
  mkdirSync(backupsDir, { recursive: true })
  const name = backupFolderName(now)
  const folder = join(backupsDir, name)
  if (existsSync(folder)) throw new BackupError(`${folder} exists already: one backup a second at most`)
  const client = new pg.Client({ connectionString: ownerUrl })
  await client.connect()
  const partial = `${folder}.partial`
  rmSync(partial, { recursive: true, force: true })
  // Personal data: readable by whoever runs the commands only.
  mkdirSync(partial, { mode: 0o700 })
  let manifest
  try {
    const serverMajor = await serverMajorOf(client)
    const pgDump = checkClient(clientBinDir(serverMajor, pgBin), 'pg_dump', serverMajor)
    const { rows: [{ server_version: serverVersion }] } = await client.query('SHOW server_version')
    await client.query('BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY')
    const { rows: [{ snapshot }] } = await client.query('SELECT pg_export_snapshot() AS snapshot')
    const tables = await tableRowCounts(client)
    log(`• dumping the database (PostgreSQL ${serverVersion}, ${Object.keys(tables).length} tables)…`)
    await runTool(pgDump, ['--format=custom', '--compress=6', `--snapshot=${snapshot}`, `--file=${join(partial, BACKUP_FILES.database)}`], ownerUrl)
    await client.query('COMMIT')
    const uploads = folderSummary(uploadsDir)
    log(`• packing the uploads folder ${uploadsDir} (${uploads.files} files)…`)
    // A missing uploads folder is packed as an empty one: a club without photos yet.
    const source = existsSync(uploadsDir) ? uploadsDir : mkdtempSync(join(tmpdir(), 'hoopwise-no-uploads-'))
    await tar.create({ gzip: true, portable: true, file: join(partial, BACKUP_FILES.uploads), cwd: source }, ['.'])
    manifest = {
      format: MANIFEST_FORMAT,
      createdAt: now.toISOString(),
      app: { name: 'hoopwise', version: appVersion },
      postgres: { serverMajor, serverVersion },
      roles: { owner: roleOfUrl(ownerUrl), app: roleOfUrl(appUrl) },
      files: {
        [BACKUP_FILES.database]: await sha256Of(join(partial, BACKUP_FILES.database)),
        [BACKUP_FILES.uploads]: await sha256Of(join(partial, BACKUP_FILES.uploads)),
      },
      uploads,
      tables,
    }
    writeFileSync(join(partial, BACKUP_FILES.manifest), `${JSON.stringify(manifest, null, 2)}\n`)
  }
  catch (error) {
    rmSync(partial, { recursive: true, force: true })
    throw error
  }
  finally {
    await client.end()
  }
  renameSync(partial, folder)
  const pruned = backupsToPrune(readdirSync(backupsDir), keep)
  for (const old of pruned) rmSync(join(backupsDir, old), { recursive: true, force: true })
  return { folder, manifest, pruned }
}

/** The role a PostgreSQL URL connects as ('' when it names none). */
export function roleOfUrl(url) {
  try {
    return decodeURIComponent(new URL(url).username)
  }
  catch {
    return ''
  }
}

/** Reads and checks a backup folder: the manifest, and each file against its SHA-256. Returns the manifest. */
export async function readBackup(folder) {
  const path = join(folder, BACKUP_FILES.manifest)
  if (!existsSync(path)) throw new BackupError(`${folder} is not a backup: it has no ${BACKUP_FILES.manifest}`)
  const manifest = JSON.parse(readFileSync(path, 'utf8'))
  if (manifest.format !== MANIFEST_FORMAT) throw new BackupError(`${path} is of format ${manifest.format}; this version reads format ${MANIFEST_FORMAT}`)
  for (const [file, digest] of Object.entries(manifest.files ?? {})) {
    const filePath = join(folder, file)
    if (!existsSync(filePath)) throw new BackupError(`${filePath} is missing`)
    if (await sha256Of(filePath) !== digest) throw new BackupError(`${filePath} is damaged: its SHA-256 differs from the manifest's`)
  }
  return manifest
}

/** Which tables' row counts differ between `expected` and `actual`, as "table: expected → actual" lines. */
export function countDifferences(expected, actual) {
  return Object.keys({ ...expected, ...actual }).sort()
    .filter(t => expected[t] !== actual[t])
    .map(t => `${t}: ${expected[t] ?? 'no table'} in the backup → ${actual[t] ?? 'no table'} restored`)
}

/** Restores the uploads of a backup folder into `uploadsDir` (created when missing). */
export async function extractUploads(folder, uploadsDir) {
  mkdirSync(uploadsDir, { recursive: true })
  // tar strips ".." and absolute paths by default: nothing lands outside the folder.
  await tar.extract({ file: join(folder, BACKUP_FILES.uploads), cwd: uploadsDir, strict: true })
}

/** Runs pg_restore of a backup folder's dump into the database at `ownerUrl`, owned by that role, in one transaction. */
export async function restoreDump(pgRestore, folder, ownerUrl) {
  // The target's own roles own everything and get their rights from grantAppRole afterwards, so a
  // backup restores under other role names too.
  await runTool(pgRestore, ['--no-owner', '--no-acl', '--exit-on-error', '--single-transaction', join(folder, BACKUP_FILES.database)], ownerUrl)
}

/**
 * `npm start`'s nightly backup: runs `npm run backup` (scripts/backup.mjs, a child process of its own,
 * so a failing backup never stops the server) at `at` ("HH:MM", this machine's time) every day, with
 * `env` (the database URLs the server was set up with). Returns a function that stops the schedule.
 */
export function scheduleNightlyBackups({ at, env, log = console.log }) {
  let timer
  let stopped = false
  const next = () => {
    if (stopped) return
    timer = setTimeout(() => {
      const child = spawn(process.execPath, [join(ROOT, 'scripts', 'backup.mjs')], { cwd: ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'ignore', 'pipe'] })
      let stderr = ''
      child.stderr.on('data', (d) => {
        stderr = (stderr + d).slice(-2000)
      })
      child.once('exit', (code) => {
        log(code === 0 ? '• nightly backup written' : `✖ nightly backup failed (exit ${code}): ${stderr.trim()}`)
        next()
      })
    }, msUntilNext(at))
  }
  next()
  log(`• nightly backup at ${at} (HOOPWISE_BACKUP_AT)`)
  return () => {
    stopped = true
    clearTimeout(timer)
  }
}
