#!/usr/bin/env node
// `npm run bench:directory`: a benchmark (not a test) of GET /api/members at 10 000 members.
// A scratch PostgreSQL in .local/bench (its own port, from HOOPWISE_TEST_PORT_OFFSET), the demo seed
// plus 10 000 invented members, the built server, N timed requests per query shape (p50/p95), and
// EXPLAIN ANALYZE of the statements the route runs (built by the same service function).
import { randomBytes } from 'node:crypto'
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { spawnSync } from 'node:child_process'
import pg from 'pg'
import { createJiti } from 'jiti'
import { ROOT, LOCAL, TEST, ensureDir } from './lib/config.mjs'
import { startPostgres, recreateDatabase } from './lib/postgres.mjs'
import { prepareDatabase } from './lib/database.mjs'
import { startAppServer } from './lib/processes.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 10_000)
const N = Number(process.env.BENCH_REQUESTS ?? 50)
const WARM_UP = 5
// Ports inside this checkout's test range (TEST.pgPort+7 and the last spare app port), so two
// checkouts with different HOOPWISE_TEST_PORT_OFFSETs never collide.
const PG_PORT = TEST.pgPort + 7
const APP_PORT = TEST.spareBase + 19
const DATABASE = 'hoopwise_bench'
const databaseUrl = `postgres://hoopwise@127.0.0.1:${PG_PORT}/${DATABASE}`
const baseUrl = `http://127.0.0.1:${APP_PORT}`

const SHAPES = [
  ['first page (name asc)', {}],
  ['page 200 (name asc)', { page: 200 }],
  ['search "reed"', { q: 'reed' }],
  ['search e-mail "bench42"', { q: 'bench42' }],
  ['status = grace', { status: 'grace' }],
  ['status = active, role = instructor', { status: 'active', role: 'instructor' }],
  ['sort paidThrough desc', { sort: 'paidThrough', dir: 'desc' }],
  ['sort joined desc, page 50', { sort: 'joined', dir: 'desc', page: 50 }],
]

const FIRST = ['Odile', 'Bram', 'Cressida', 'Dov', 'Elowen', 'Fenn', 'Gwilym', 'Hollis', 'Ines', 'Jory', 'Kestrel', 'Lorcan',
  'Mirela', 'Nell', 'Osric', 'Pell', 'Quenby', 'Rook', 'Saffi', 'Tamsin', 'Ulric', 'Vesna', 'Wren', 'Xanthe', 'Yestin', 'Zillah']
const LAST = ['Marshcombe', 'Saltreed', 'Ebbridge', 'Fluke', 'Gullyhaven', 'Kelpford', 'Mudlark', 'Oysterby', 'Pebblewick',
  'Reedmere', 'Samphire', 'Shinglebank', 'Spartina', 'Tidemark', 'Wadeholm', 'Wickerwade', 'Cordgrass', 'Brackenfen', 'Holloway']

/** Adds `count` invented members to the demo club in two set-based INSERTs, in every status. */
async function insertMembers(client, count) {
  const [{ id: clubId }] = (await client.query(`SELECT id FROM clubs WHERE tag_prefix = 'SRG'`)).rows
  await client.query(`
    INSERT INTO users (email, name, password_hash, email_verified_at)
    SELECT format('bench%s.%s@bench.hoopwise.example', i, lower(($2::text[])[1 + i % cardinality($2::text[])])),
           format('%s %s', ($2::text[])[1 + i % cardinality($2::text[])], ($3::text[])[1 + (i / 7) % cardinality($3::text[])]),
           'not-a-password-hash', now()
    FROM generate_series(1, $1::int) AS i`, [count, FIRST, LAST])
  // Paid-through spread over roughly a year either side of today; some never paid, suspended, resigned.
  await client.query(`
    INSERT INTO memberships (club_id, user_id, roles, approved_at, paid_through, suspended_at, suspended_reason, resigned_at, created_at)
    SELECT $1, u.id,
           CASE WHEN n % 500 = 0 THEN ARRAY['member', 'admin'] WHEN n % 200 = 0 THEN ARRAY['member', 'instructor', 'safety_officer']
                WHEN n % 25 = 0 THEN ARRAY['member', 'instructor'] ELSE ARRAY['member'] END,
           CASE WHEN n % 50 = 0 THEN NULL ELSE now() END,
           CASE WHEN n % 50 = 0 THEN NULL ELSE CURRENT_DATE + ((n * 37) % 730 - 365) END,
           CASE WHEN n % 97 = 0 THEN now() END, CASE WHEN n % 97 = 0 THEN 'Bench suspension' END,
           CASE WHEN n % 89 = 0 THEN now() END,
           now() - make_interval(hours => n)
    FROM (SELECT id, (row_number() OVER (ORDER BY email))::int AS n FROM users WHERE email LIKE '%@bench.hoopwise.example') u`, [clubId])
  await client.query('ANALYZE users; ANALYZE memberships')
}

async function signIn() {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'admin@hoopwise.example', password: 'hoopwise-demo' }),
  })
  if (res.status !== 200) throw new Error(`admin sign-in failed: ${res.status}`)
  return res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c.startsWith('nuxt-session='))
}

const percentile = (sorted, p) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]

async function timeShape(cookie, query) {
  const url = new URL('/api/members', baseUrl)
  for (const [k, v] of Object.entries(query)) url.searchParams.set(k, String(v))
  let total = 0
  const times = []
  for (let i = 0; i < WARM_UP + N; i++) {
    const started = performance.now()
    const res = await fetch(url, { headers: { cookie, accept: 'application/json' } })
    const body = await res.json()
    const ms = performance.now() - started
    if (res.status !== 200) throw new Error(`${url.search}: ${res.status} ${JSON.stringify(body)}`)
    total = body.total
    if (i >= WARM_UP) times.push(ms)
  }
  times.sort((a, b) => a - b)
  return { p50: percentile(times, 50), p95: percentile(times, 95), total }
}

/** `$name` bind parameters (as the service writes them) turned into pg's positional `$1`. */
function positional(sql, bind) {
  const names = []
  const text = sql.replace(/\$(\w+)/g, (_, name) => {
    if (!names.includes(name)) names.push(name)
    return `$${names.indexOf(name) + 1}`
  })
  return { text, values: names.map(n => bind[n]) }
}

async function explain(client, label, sql, bind) {
  const { text, values } = positional(sql, bind)
  const { rows } = await client.query(`EXPLAIN (ANALYZE, BUFFERS) ${text}`, values)
  console.log(`\n── EXPLAIN ANALYZE: ${label}`)
  for (const row of rows) console.log(`   ${row['QUERY PLAN']}`)
}

let server
let pgCluster
let client
try {
  if (!existsSync(join(ROOT, '.output/server/index.mjs'))) {
    console.log('• no build found: building (nuxt build)…')
    const built = spawnSync('npx', ['nuxt', 'build'], { cwd: ROOT, stdio: 'inherit' })
    if (built.status !== 0) throw new Error('nuxt build failed')
  }
  const dir = ensureDir(join(LOCAL, 'bench', 'pg'))
  pgCluster = startPostgres({ dir, port: PG_PORT, database: 'postgres', fast: true })
  recreateDatabase({ port: PG_PORT, database: DATABASE })
  await prepareDatabase({ databaseUrl, publicUrl: baseUrl, log: () => {} })
  client = new pg.Client({ connectionString: databaseUrl })
  await client.connect()
  const started = performance.now()
  await insertMembers(client, MEMBERS)
  const { rows: [{ count }] } = await client.query('SELECT count(*)::int AS count FROM memberships')
  console.log(`• ${count} memberships in the scratch database (${MEMBERS} added in ${Math.round(performance.now() - started)} ms)`)

  server = await startAppServer({
    root: ROOT,
    port: APP_PORT,
    env: {
      NODE_ENV: 'production',
      NUXT_DATABASE_URL: databaseUrl,
      NUXT_SESSION_PASSWORD: randomBytes(32).toString('hex'),
      NUXT_PUBLIC_URL: baseUrl,
      NUXT_SMTP_HOST: '127.0.0.1',
      NUXT_SMTP_PORT: String(TEST.spareBase + 18),
    },
  })
  const cookie = await signIn()
  console.log(`\nGET /api/members, ${N} sequential requests per shape after ${WARM_UP} warm-up (pageSize 25):`)
  console.log(`${'shape'.padEnd(38)} ${'rows'.padStart(6)} ${'p50 ms'.padStart(8)} ${'p95 ms'.padStart(8)}`)
  for (const [label, query] of SHAPES) {
    const { p50, p95, total } = await timeShape(cookie, query)
    console.log(`${label.padEnd(38)} ${String(total).padStart(6)} ${p50.toFixed(1).padStart(8)} ${p95.toFixed(1).padStart(8)}`)
  }

  const jiti = createJiti(import.meta.url)
  const { directoryStatements } = await jiti.import('../server/services/member-directory.ts')
  const { MemberDirectoryQuerySchema } = await jiti.import('../shared/schemas/member.ts')
  const { rows: [club] } = await client.query(`SELECT id, time_zone AS "timeZone", grace_days AS "graceDays" FROM clubs WHERE tag_prefix = 'SRG'`)
  const first = directoryStatements(club, MemberDirectoryQuerySchema.parse({}))
  await explain(client, 'first page, count', first.countSql, first.bind)
  await explain(client, 'first page, rows (ORDER BY lower(name), id LIMIT 25)', first.pageSql, first.bind)
  const deep = directoryStatements(club, MemberDirectoryQuerySchema.parse({ page: 200 }))
  await explain(client, 'page 200 (OFFSET 4975), rows', deep.pageSql, deep.bind)
  const search = directoryStatements(club, MemberDirectoryQuerySchema.parse({ q: 'reed' }))
  await explain(client, 'search "reed", rows', search.pageSql, search.bind)
  const grace = directoryStatements(club, MemberDirectoryQuerySchema.parse({ status: 'grace', sort: 'paidThrough', dir: 'desc' }))
  await explain(client, 'status grace sorted by paidThrough desc, rows', grace.pageSql, grace.bind)
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  process.exitCode = 1
}
finally {
  await client?.end().catch(() => {})
  await server?.stop()
  pgCluster?.stop()
}
