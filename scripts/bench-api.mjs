#!/usr/bin/env node
// `npm run bench:api`: a load benchmark (not a test) of the signed-in read routes. One build, a scratch
// PostgreSQL in .local/bench-api (ports from HOOPWISE_TEST_PORT_OFFSET) with the demo club plus 10 000
// invented members, the production server connected as the application role, the demo admin signed in,
// then each route in turn driven by autocannon (20 connections, a fixed duration, the admin's cookie on
// every request). Prints requests/s, p95 latency, errors and each route's ratio to GET /api/_auth/session
// (the signed-in floor: unseal the cookie, check the session row) against the targets.
import { availableParallelism, loadavg } from 'node:os'
import autocannon from 'autocannon'
import { TEST } from './lib/config.mjs'
import { ensureBuild, signInDemoAdmin, startBenchStack } from './lib/bench.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 10_000)
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10)
const WARM_UP_SECONDS = Number(process.env.BENCH_WARMUP_SECONDS ?? 1)
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 20)
// BENCH_REUSE_BUILD=1 skips `nuxt build` when .output/ holds a build of the current code.
const REUSE_BUILD = process.env.BENCH_REUSE_BUILD === '1'
// Ports of this benchmark alone (bench:directory takes pgPort+7 and spareBase+18/19).
const PG_PORT = TEST.pgPort + 8
const APP_PORT = TEST.spareBase + 17
const SMTP_PORT = TEST.spareBase + 16

const FLOOR = '/api/_auth/session'
// [path, share of the floor it must reach (null: no target)]. The directory at 10 000 members must
// reach a quarter of the floor; every other signed-in read route half of it.
const routes = adminMemberId => [
  ['/api/health', null],
  [FLOOR, null],
  ['/api/me/standing', 0.5],
  ['/api/me/sessions', 0.5],
  ['/api/me/notice-settings', 0.5],
  ['/api/waivers/current', 0.5],
  ['/api/dashboard', 0.5],
  [`/api/members/${adminMemberId}`, 0.5],
  ['/api/outbox', 0.5],
  ['/api/audit', 0.5],
  ['/api/members', 0.25],
  ['/api/members?page=200', 0.25],
  ['/api/members?q=reed', 0.25],
]

/** The value at percentile `p` of ascending `sorted`. */
const percentile = (sorted, p) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] ?? NaN

/**
 * Drives GET `path` for `seconds` with CONNECTIONS connections carrying `cookie`; returns requests/s,
 * p95 latency (ms, from every response) and the non-2xx answers by status plus transport errors.
 */
async function drive(baseUrl, path, cookie, seconds) {
  const latencies = []
  const statuses = new Map()
  const instance = autocannon({
    url: new URL(path, baseUrl).href,
    connections: CONNECTIONS,
    duration: seconds,
    headers: { cookie, accept: 'application/json' },
  })
  instance.on('response', (_client, statusCode, _bytes, responseTime) => {
    latencies.push(responseTime)
    if (statusCode < 200 || statusCode > 299) statuses.set(statusCode, (statuses.get(statusCode) ?? 0) + 1)
  })
  const result = await instance
  latencies.sort((a, b) => a - b)
  const non2xx = [...statuses.values()].reduce((a, b) => a + b, 0)
  return {
    rps: result.requests.total / result.duration,
    p95: percentile(latencies, 95),
    errors: non2xx + result.errors + result.timeouts,
    detail: [...[...statuses].map(([code, n]) => `${n}× ${code}`), result.errors ? `${result.errors} errors` : '', result.timeouts ? `${result.timeouts} timeouts` : '']
      .filter(Boolean).join(', '),
  }
}

/** Fetches `path` once and throws on a non-2xx answer, so a broken route is seen before it is timed. */
async function check(baseUrl, path, cookie) {
  const res = await fetch(new URL(path, baseUrl), { headers: { cookie, accept: 'application/json' } })
  const body = await res.text()
  if (!res.ok) throw new Error(`GET ${path}: ${res.status} ${body.slice(0, 300)}`)
}

const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

let stack
try {
  ensureBuild({ rebuild: !REUSE_BUILD })
  stack = await startBenchStack({ name: 'bench-api', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: SMTP_PORT, members: MEMBERS })
  const { client, baseUrl } = stack
  const cookie = await signInDemoAdmin(baseUrl)
  const { rows: [{ id: adminMemberId }] } = await client.query(`SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id
    WHERE u.email = 'admin@hoopwise.example'`)
  const list = routes(adminMemberId)
  for (const [path] of list) await check(baseUrl, path, cookie)

  console.log(`\n${availableParallelism()} CPUs, load average ${load()} before the run; ${CONNECTIONS} connections, `
    + `${SECONDS} s per route after ${WARM_UP_SECONDS} s warm-up\n`)
  const results = []
  for (const [path, target] of list) {
    if (WARM_UP_SECONDS > 0) await drive(baseUrl, path, cookie, WARM_UP_SECONDS)
    const measured = await drive(baseUrl, path, cookie, SECONDS)
    results.push({ path, label: path.replace(adminMemberId, ':id'), target, ...measured })
    console.log(`  ${('GET ' + path.replace(adminMemberId, ':id')).padEnd(34)} ${measured.rps.toFixed(0).padStart(6)} req/s`)
  }

  const floor = results.find(r => r.path === FLOOR).rps
  const head = `${'route'.padEnd(34)} ${'req/s'.padStart(7)} ${'p95 ms'.padStart(7)} ${'errors'.padStart(7)} ${'× floor'.padStart(8)}  target`
  console.log(`\n${head}\n${'─'.repeat(head.length + 12)}`)
  let missed = 0
  for (const r of results) {
    const ratio = r.rps / floor
    const met = r.target === null ? '' : ratio >= r.target && r.errors === 0 ? `≥ ${r.target}× met` : `≥ ${r.target}× MISSED`
    if (r.target !== null && !met.endsWith('met')) missed++
    console.log(`${('GET ' + r.label).padEnd(34)} ${r.rps.toFixed(0).padStart(7)} ${r.p95.toFixed(1).padStart(7)} `
      + `${String(r.errors).padStart(7)} ${ratio.toFixed(2).padStart(8)}  ${met}`)
    if (r.errors) console.log(`    non-2xx or failed: ${r.detail}`)
  }
  console.log(`\nload average ${load()} after the run; ${missed ? `${missed} route(s) below target` : 'every target met'}`)
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  process.exitCode = 1
}
finally {
  await stack?.stop()
}
