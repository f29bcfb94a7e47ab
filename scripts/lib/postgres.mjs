// A private PostgreSQL cluster on loopback, in a git-ignored folder of the project.
// Used by scripts/start.mjs, scripts/test.mjs and the tests that need a database of their own.
import { execFileSync, spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, chownSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { createHash } from 'node:crypto'
import { userInfo } from 'node:os'

/** The role migrations run as: it owns the database and its tables (the cluster's first role). */
export const OWNER_ROLE = 'hoopwise'
/** The role the application connects as: it owns nothing (see scripts/lib/database.mjs grantAppRole). */
export const APP_ROLE = 'hoopwise_app'

const PG_BIN_CANDIDATES = ['/usr/lib/postgresql/15/bin', '/usr/lib/postgresql/16/bin', '/usr/lib/postgresql/17/bin']
const isRoot = () => userInfo().uid === 0

/** Finds the PostgreSQL server binaries; installs Debian's package when missing and running as root. */
export function ensurePostgresBinaries() {
  let dir = PG_BIN_CANDIDATES.find(d => existsSync(join(d, 'pg_ctl')))
  if (dir) return dir
  if (!isRoot()) {
    throw new Error('PostgreSQL 15 is missing. Install it with: sudo apt-get install -y postgresql')
  }
  console.log('• installing PostgreSQL (Debian package postgresql)…')
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' })
  execFileSync('apt-get', ['install', '-y', '-qq', 'postgresql'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
  dir = PG_BIN_CANDIDATES.find(d => existsSync(join(d, 'pg_ctl')))
  if (!dir) throw new Error('PostgreSQL was installed but pg_ctl was not found under /usr/lib/postgresql')
  return dir
}

function pgUid() {
  const out = spawnSync('id', ['-u', 'postgres'], { encoding: 'utf8' })
  const gid = spawnSync('id', ['-g', 'postgres'], { encoding: 'utf8' })
  if (out.status !== 0) throw new Error('The postgres system user is missing (it comes with Debian\'s postgresql package)')
  return { uid: Number(out.stdout.trim()), gid: Number(gid.stdout.trim()) }
}

/** Runs a PostgreSQL binary, as the postgres user when we are root (the server refuses root). */
function runPg(binDir, tool, args, opts = {}) {
  const cmd = join(binDir, tool)
  const [file, argv] = isRoot() ? ['runuser', ['-u', 'postgres', '--', cmd, ...args]] : [cmd, args]
  return execFileSync(file, argv, { stdio: opts.stdio ?? 'pipe', encoding: 'utf8', env: { ...process.env, LC_ALL: 'C.UTF-8' } })
}

/**
 * Where the cluster for `dir` lives: `dir` itself, unless we run as root and the postgres user cannot
 * reach it (a checkout under a private home folder such as /root); then a folder of its own under
 * /var/tmp, named after `dir`, so the server can still run as postgres.
 */
export function clusterDir(dir) {
  if (!isRoot()) return dir
  mkdirSync(dirname(dir), { recursive: true })
  const reachable = spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-x', dirname(dir)]).status === 0
  if (reachable) return dir
  const fallback = join('/var/tmp/hoopwise-pg', createHash('sha256').update(dir).digest('hex').slice(0, 16))
  mkdirSync(dirname(fallback), { recursive: true })
  return fallback
}

/**
 * Initialises (once) and starts a cluster in `dir` (see clusterDir) on 127.0.0.1:`port`, and creates
 * `database` and the application role. Returns { url, ownerUrl, appUrl, stop }: `url` and `ownerUrl`
 * connect as the owner role (migrations, tests arranging data), `appUrl` as the application role;
 * stop() shuts the cluster down (fast mode).
 */
export function startPostgres({ dir: projectDir, port, database, fast = false }) {
  const binDir = ensurePostgresBinaries()
  const dir = clusterDir(projectDir)
  if (dir !== projectDir) console.log(`• the postgres user cannot reach ${projectDir}; the cluster lives in ${dir}`)
  const dataDir = join(dir, 'data')
  const socketDir = join(dir, 'socket')
  if (!existsSync(join(dataDir, 'PG_VERSION'))) {
    mkdirSync(dataDir, { recursive: true })
    mkdirSync(socketDir, { recursive: true })
    if (isRoot()) {
      const { uid, gid } = pgUid()
      for (const d of [dir, dataDir, socketDir]) chownSync(d, uid, gid)
    }
    runPg(binDir, 'initdb', ['-D', dataDir, '-U', 'hoopwise', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8'])
  }
  mkdirSync(socketDir, { recursive: true })
  if (isRoot()) {
    const { uid, gid } = pgUid()
    chownSync(socketDir, uid, gid)
  }
  const status = spawnSync(isRoot() ? 'runuser' : join(binDir, 'pg_ctl'),
    isRoot() ? ['-u', 'postgres', '--', join(binDir, 'pg_ctl'), 'status', '-D', dataDir] : ['status', '-D', dataDir])
  if (status.status !== 0) {
    // fast: tests trade crash safety for speed; the demo keeps the defaults.
    const options = `-c listen_addresses=127.0.0.1 -p ${port} -k ${socketDir}` + (fast ? ' -c fsync=off -c synchronous_commit=off' : '')
    runPg(binDir, 'pg_ctl', ['start', '-w', '-t', '60', '-D', dataDir, '-l', join(dir, 'postgres.log'), '-o', options])
  }
  const exists = runPg(binDir, 'psql', ['-h', '127.0.0.1', '-p', String(port), '-U', 'hoopwise', '-d', 'postgres', '-tAc',
    `SELECT 1 FROM pg_database WHERE datname = '${database}'`]).trim()
  if (exists !== '1') runPg(binDir, 'createdb', ['-h', '127.0.0.1', '-p', String(port), '-U', 'hoopwise', database])
  // The application role: may log in, owns nothing, creates nothing (its grants come after migrating).
  runPg(binDir, 'psql', ['-h', '127.0.0.1', '-p', String(port), '-U', OWNER_ROLE, '-d', 'postgres', '-tAc',
    `DO $$ BEGIN IF NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = '${APP_ROLE}') THEN
       CREATE ROLE ${APP_ROLE} LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE NOINHERIT; END IF; END $$`])
  const ownerUrl = `postgres://${OWNER_ROLE}@127.0.0.1:${port}/${database}`
  return {
    url: ownerUrl,
    ownerUrl,
    appUrl: `postgres://${APP_ROLE}@127.0.0.1:${port}/${database}`,
    stop: () => stopPostgres(projectDir),
  }
}

/** Stops the cluster in `dir` if it is running. */
export function stopPostgres(projectDir) {
  const binDir = ensurePostgresBinaries()
  const dir = clusterDir(projectDir)
  try {
    runPg(binDir, 'pg_ctl', ['stop', '-m', 'fast', '-w', '-D', join(dir, 'data')])
  }
  catch { /* not running */ }
}

/** Drops and recreates `database` (tests start from a fresh schema). */
export function recreateDatabase({ port, database }) {
  const binDir = ensurePostgresBinaries()
  runPg(binDir, 'dropdb', ['-h', '127.0.0.1', '-p', String(port), '-U', 'hoopwise', '--if-exists', '--force', database])
  runPg(binDir, 'createdb', ['-h', '127.0.0.1', '-p', String(port), '-U', 'hoopwise', database])
}
