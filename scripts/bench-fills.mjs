#!/usr/bin/env node
// `npm run bench:fills`: a load benchmark (not a test) of the fill gate. One build, a scratch PostgreSQL
// in .local/bench-fills (ports from HOOPWISE_TEST_PORT_OFFSET) with the demo club plus 10 000 invented
// members holding tiers and courses, 20 000 vessels in service with passed proofs and 200 000 fills, all
// inserted in bulk inside PostgreSQL; the production server as the application role; the demo instructor
// signed in and on the staff of today's event. Then GET /api/_auth/session (the signed-in floor) and
// POST /api/fills/check for random owner–vessel pairs at that event (most allowed: the whole gate runs),
// each from 20 connections; any non-200 answer counts as an error. Prints requests/s, p95 and the ratio.
import { availableParallelism, loadavg } from 'node:os'
import autocannon from 'autocannon'
import { TEST } from './lib/config.mjs'
import { ensureBuild, startBenchStack } from './lib/bench.mjs'
import { seedFillWorld } from './lib/fill-world.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 10_000)
const VESSELS = Number(process.env.BENCH_VESSELS ?? 20_000)
const FILLS = Number(process.env.BENCH_FILLS ?? 200_000)
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10)
const WARM_UP_SECONDS = Number(process.env.BENCH_WARMUP_SECONDS ?? 2)
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 20)
const REUSE_BUILD = process.env.BENCH_REUSE_BUILD === '1'
// Ports of this benchmark alone (bench:api takes pgPort+8 and spareBase+16/17).
const PG_PORT = TEST.pgPort + 9
const SMTP_PORT = TEST.spareBase + 14
const APP_PORT = TEST.spareBase + 15
const TARGET = 0.5
const FLOOR = '/api/_auth/session'

async function signInDemoInstructor(baseUrl) {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'instructor@hoopwise.example', password: 'hoopwise-demo' }),
  })
  if (res.status !== 200) throw new Error(`instructor sign-in failed: ${res.status}`)
  return res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c.startsWith('nuxt-session='))
}

const percentile = (sorted, p) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] ?? NaN

/** Drives `request` (a GET path, or a body maker for POST /api/fills/check) for `seconds`; requests/s, p95, errors. */
async function drive(baseUrl, cookie, seconds, { path, body }) {
  const latencies = []
  const statuses = new Map()
  const instance = autocannon({
    url: new URL(path, baseUrl).href,
    connections: CONNECTIONS,
    duration: seconds,
    headers: { cookie, accept: 'application/json', ...(body ? { 'content-type': 'application/json' } : {}) },
    requests: [body ? { method: 'POST', setupRequest: req => ({ ...req, body: JSON.stringify(body()) }) } : { method: 'GET' }],
  })
  instance.on('response', (_client, statusCode, _bytes, responseTime) => {
    latencies.push(responseTime)
    if (statusCode !== 200) statuses.set(statusCode, (statuses.get(statusCode) ?? 0) + 1)
  })
  const result = await instance
  latencies.sort((a, b) => a - b)
  const errors = [...statuses.values()].reduce((a, b) => a + b, 0) + result.errors + result.timeouts
  return {
    rps: result.requests.total / result.duration,
    p95: percentile(latencies, 95),
    errors,
    detail: [...statuses].map(([code, n]) => `${n}× ${code}`).join(', '),
  }
}

const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

let stack
try {
  ensureBuild({ rebuild: !REUSE_BUILD })
  stack = await startBenchStack({ name: 'bench-fills', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: SMTP_PORT, members: MEMBERS })
  const { client, baseUrl } = stack
  const started = performance.now()
  const { eventId, stationId, pairs } = await seedFillWorld(client, { vessels: VESSELS, fills: FILLS })
  console.log(`• fill world seeded in ${Math.round(performance.now() - started)} ms`)
  const cookie = await signInDemoInstructor(baseUrl)
  const fillBody = () => {
    const pair = pairs[Math.floor(Math.random() * pairs.length)]
    return { ...pair, pressure: 4 + Math.random() * 5, unit: 'bar', waterVolumeL: 0.6, stationId, eventId }
  }
  const probe = await fetch(new URL('/api/fills/check', baseUrl), { method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify(fillBody()) })
  const probeBody = await probe.text()
  if (probe.status !== 200 || !probeBody.includes('"allowed":true')) throw new Error(`POST /api/fills/check: ${probe.status} ${probeBody.slice(0, 400)}`)
  // A sample of the pairs the load draws from: most must be allowed, so the timed checks run the whole gate.
  let allowed = 0
  for (let i = 0; i < 100; i++) {
    const res = await fetch(new URL('/api/fills/check', baseUrl), { method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify(fillBody()) })
    if ((await res.json()).allowed) allowed++
  }
  console.log(`• ${allowed} of 100 sample checks allowed`)

  console.log(`\n${availableParallelism()} CPUs, load average ${load()} before the run; ${CONNECTIONS} connections, ${SECONDS} s per route after ${WARM_UP_SECONDS} s warm-up\n`)
  const runs = [['GET ' + FLOOR, { path: FLOOR }], ['POST /api/fills/check', { path: '/api/fills/check', body: fillBody }]]
  const results = []
  for (const [label, request] of runs) {
    if (WARM_UP_SECONDS > 0) await drive(baseUrl, cookie, WARM_UP_SECONDS, request)
    results.push({ label, ...await drive(baseUrl, cookie, SECONDS, request) })
  }
  const floor = results[0].rps
  const head = `${'route'.padEnd(26)} ${'req/s'.padStart(7)} ${'p95 ms'.padStart(7)} ${'errors'.padStart(7)} ${'× floor'.padStart(8)}  target`
  console.log(`${head}\n${'─'.repeat(head.length + 12)}`)
  for (const r of results) {
    const ratio = r.rps / floor
    const target = r.label === 'GET ' + FLOOR ? '' : ratio >= TARGET && r.errors === 0 ? `≥ ${TARGET}× met` : `≥ ${TARGET}× MISSED`
    console.log(`${r.label.padEnd(26)} ${r.rps.toFixed(0).padStart(7)} ${r.p95.toFixed(1).padStart(7)} ${String(r.errors).padStart(7)} ${ratio.toFixed(2).padStart(8)}  ${target}`)
    if (r.errors) console.log(`    non-200 or failed: ${r.detail}`)
  }
  const check = results[1]
  console.log(`\nload average ${load()} after the run; the fill check at ${(check.rps / floor).toFixed(2)}× the floor`)
  if (check.rps / floor < TARGET || check.errors) process.exitCode = 1
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  process.exitCode = 1
}
finally {
  await stack?.stop()
}
