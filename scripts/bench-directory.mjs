#!/usr/bin/env node
// `npm run bench:directory`: a benchmark (not a test) of GET /api/members at 10 000 members.
// A scratch PostgreSQL in .local/bench (its own port, from HOOPWISE_TEST_PORT_OFFSET), the demo seed
// plus 10 000 invented members, the built server, N timed requests per query shape (p50/p95), and
// EXPLAIN ANALYZE of the statements the route runs (built by the same service function).
import { createJiti } from 'jiti'
import { JITI_OPTIONS, TEST } from './lib/config.mjs'
import { ensureBuild, signInDemoAdmin, startBenchStack } from './lib/bench.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 10_000)
const N = Number(process.env.BENCH_REQUESTS ?? 50)
const WARM_UP = 5
// Ports inside this checkout's test range (TEST.pgPort+7 and the last spare app port), so two
// checkouts with different HOOPWISE_TEST_PORT_OFFSETs never collide.
const PG_PORT = TEST.pgPort + 7
const APP_PORT = TEST.spareBase + 19

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

const percentile = (sorted, p) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]

async function timeShape(baseUrl, cookie, query) {
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

let stack
try {
  ensureBuild({ rebuild: false })
  stack = await startBenchStack({ name: 'bench', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: TEST.spareBase + 18, members: MEMBERS })
  const { client, baseUrl } = stack
  const cookie = await signInDemoAdmin(baseUrl)
  console.log(`\nGET /api/members, ${N} sequential requests per shape after ${WARM_UP} warm-up (pageSize 25):`)
  console.log(`${'shape'.padEnd(38)} ${'rows'.padStart(6)} ${'p50 ms'.padStart(8)} ${'p95 ms'.padStart(8)}`)
  for (const [label, query] of SHAPES) {
    const { p50, p95, total } = await timeShape(baseUrl, cookie, query)
    console.log(`${label.padEnd(38)} ${String(total).padStart(6)} ${p50.toFixed(1).padStart(8)} ${p95.toFixed(1).padStart(8)}`)
  }

  const jiti = createJiti(import.meta.url, JITI_OPTIONS)
  const { directoryStatements } = await jiti.import('../server/services/members/directory.ts')
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
  await stack?.stop()
}
