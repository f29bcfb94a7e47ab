#!/usr/bin/env node
// `npm run bench:desk`: a load benchmark (not a test) of the safety officer's audit desk. One build, a
// scratch PostgreSQL in .local/bench-desk (ports from HOOPWISE_TEST_PORT_OFFSET) seeded with the fill
// benchmark's world (10 000 members, 20 000 vessels, 200 000 fills) plus what the desk lists: tiers and
// training falling due, suspended tiers, vessels held, open incidents. The production server as the
// application role; the demo safety officer signed in. Then GET /api/_auth/session (the signed-in
// floor) and every desk route (counts, charts, each table's first page and its CSV), each from 20 connections; any non-200 answer counts as an error.
// The machine is shared, so each route is measured in rounds, each round the floor then the route back
// to back; a route's ratio is the median of its rounds' ratios (target ≥ 0.25×). Prints requests/s,
// p95, the paired floor and the ratio.
import { availableParallelism, loadavg } from 'node:os'
import autocannon from 'autocannon'
import { TEST } from './lib/config.mjs'
import { ensureBuild, startBenchStack } from './lib/bench.mjs'
import { seedFillWorld } from './lib/fill-world.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 10_000)
const VESSELS = Number(process.env.BENCH_VESSELS ?? 20_000)
const FILLS = Number(process.env.BENCH_FILLS ?? 200_000)
// Seconds of each half of a round (the floor, then the route), and rounds per route.
const SECONDS = Number(process.env.BENCH_SECONDS ?? 2)
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3)
const WARM_UP_SECONDS = Number(process.env.BENCH_WARMUP_SECONDS ?? 1)
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 20)
const REUSE_BUILD = process.env.BENCH_REUSE_BUILD === '1'
// BENCH_HOLD=1 seeds, prints the database and server addresses and the cookie, and waits for Ctrl-C
// (to EXPLAIN a desk query on the benchmark's data) instead of driving the routes.
const HOLD = process.env.BENCH_HOLD === '1'
// Ports of this benchmark alone (bench:fills takes pgPort+9 and spareBase+14/15).
const PG_PORT = TEST.pgPort + 10
const SMTP_PORT = TEST.spareBase + 12
const APP_PORT = TEST.spareBase + 13
const TARGET = 0.25
const FLOOR = '/api/_auth/session'
const TABLES = ['tiers-expiring', 'training-expiring', 'fit-tests-expiring', 'tiers-lapsed', 'refused-next',
  'proofs', 'vessels-held', 'gauges', 'event-fills', 'incidents']

/**
 * What the desk lists, on top of the fill world: a twentieth of the tiers and a tenth of the training
 * records due within 90 days, a fiftieth of the tiers suspended, a twentieth of the proofs lapsed or
 * lapsing, about one vessel in a hundred held (quarantined or failed), and up to 100 open incidents on
 * the quarantined ones.
 */
async function seedDeskWorld(client) {
  const q = (text, values) => client.query(text, values)
  const [{ club_id: clubId, safety_id: safetyId }] = (await q(`SELECT m.club_id, m.id AS safety_id FROM memberships m
    JOIN users u ON u.id = m.user_id WHERE u.email = 'safety@hoopwise.example'`)).rows
  await q(`UPDATE member_tiers SET expires_on = CURRENT_DATE + (hashtext(id::text) & 127) % 90
    WHERE club_id = $1 AND hashtext(id::text) % 20 = 0`, [clubId])
  await q(`UPDATE member_tiers SET suspended_at = now(), suspension_reason = 'Bench suspension', suspended_by_membership_id = $2
    WHERE club_id = $1 AND membership_id <> $2 AND hashtext(id::text) % 50 = 1`, [clubId, safetyId])
  await q(`UPDATE training_records SET expires_on = CURRENT_DATE + (hashtext(id::text) & 127) % 90
    WHERE club_id = $1 AND hashtext(id::text) % 10 = 0`, [clubId])
  await q(`UPDATE vessels SET state = CASE WHEN hashtext(id::text) % 100 = 3 THEN 'quarantined' ELSE 'failed' END
    WHERE club_id = $1 AND number > 100000 AND hashtext(id::text) % 100 IN (3, 4)`, [clubId])
  // A twentieth of the proofs 280–400 days old: lapsed or lapsing within 90 days (the rest stay current).
  await q(`UPDATE proof_tests SET tested_on = CURRENT_DATE - 280 - (hashtext(id::text) & 127) % 120
    WHERE club_id = $1 AND hashtext(id::text) % 20 = 0`, [clubId])
  await q(`INSERT INTO incidents (club_id, reported_by_membership_id, kind, happened_at, place, vessel_id, what_happened)
    SELECT $1, owner_membership_id, 'near_miss', now() - interval '1 day', 'Bench field', id, 'Bench incident'
      FROM vessels WHERE club_id = $1 AND state = 'quarantined' LIMIT 100`, [clubId])
  await q('ANALYZE')
  const counts = (await q(`SELECT (SELECT count(*) FROM member_tiers WHERE club_id = $1 AND expires_on < CURRENT_DATE + 90)::int AS due,
    (SELECT count(*) FROM incidents WHERE club_id = $1)::int AS incidents,
    (SELECT count(*) FROM vessels WHERE club_id = $1 AND state IN ('quarantined', 'failed'))::int AS held`, [clubId])).rows[0]
  console.log(`• ${counts.due} tiers due within 90 days, ${counts.held} vessels held, ${counts.incidents} open incidents`)
}

async function signInDemoSafety(baseUrl) {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'safety@hoopwise.example', password: 'hoopwise-demo' }),
  })
  if (res.status !== 200) throw new Error(`safety officer sign-in failed: ${res.status}`)
  return res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c.startsWith('nuxt-session='))
}

const median = values => [...values].sort((a, b) => a - b)[Math.floor((values.length - 1) / 2)]
const percentile = (sorted, p) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] ?? NaN

/** Drives GET `path` for `seconds`; requests/s, p95, errors. */
async function drive(baseUrl, cookie, seconds, path) {
  const latencies = []
  const statuses = new Map()
  const instance = autocannon({
    url: new URL(path, baseUrl).href, connections: CONNECTIONS, duration: seconds,
    headers: { cookie, accept: 'application/json' },
  })
  instance.on('response', (_client, statusCode, _bytes, responseTime) => {
    latencies.push(responseTime)
    if (statusCode !== 200) statuses.set(statusCode, (statuses.get(statusCode) ?? 0) + 1)
  })
  const result = await instance
  latencies.sort((a, b) => a - b)
  const errors = [...statuses.values()].reduce((a, b) => a + b, 0) + result.errors + result.timeouts
  return { rps: result.requests.total / result.duration, p95: percentile(latencies, 95), errors, detail: [...statuses].map(([code, n]) => `${n}× ${code}`).join(', ') }
}

const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

let stack
try {
  ensureBuild({ rebuild: !REUSE_BUILD })
  stack = await startBenchStack({ name: 'bench-desk', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: SMTP_PORT, members: MEMBERS })
  const { client, baseUrl } = stack
  const started = performance.now()
  await seedFillWorld(client, { vessels: VESSELS, fills: FILLS })
  await seedDeskWorld(client)
  console.log(`• desk world seeded in ${Math.round(performance.now() - started)} ms`)
  const cookie = await signInDemoSafety(baseUrl)
  if (HOLD) {
    console.log(`• holding: psql ${stack.ownerUrl}\n  curl -H 'cookie: ${cookie}' ${baseUrl}/api/audit/desk\n  Ctrl-C stops`)
    await new Promise(resolve => process.once('SIGINT', resolve))
  }
  else {
    await driveDesk(baseUrl, cookie)
  }
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  process.exitCode = 1
}
finally {
  await stack?.stop()
}

/**
 * Every desk route against the floor, in turn: after a warm-up, ROUNDS rounds of the floor then the
 * route, so load from elsewhere on the machine weighs on both sides of each ratio; prints the table
 * (medians of the rounds) and sets the exit code when one misses.
 */
async function driveDesk(baseUrl, cookie) {
  const paths = ['/api/audit/desk', '/api/audit/desk/charts', ...TABLES.map(t => `/api/audit/desk/${t}`), ...TABLES.map(t => `/api/audit/desk/${t}/export`)]
  for (const path of paths) {
    const probe = await fetch(new URL(path, baseUrl), { headers: { cookie } })
    if (probe.status !== 200) throw new Error(`GET ${path}: ${probe.status} ${(await probe.text()).slice(0, 400)}`)
  }
  console.log(`\n${availableParallelism()} CPUs, load average ${load()} before the run; ${CONNECTIONS} connections; per route ${ROUNDS} rounds of ${SECONDS} s of the floor (GET ${FLOOR}) then ${SECONDS} s of the route, after ${WARM_UP_SECONDS} s warm-up\n`)
  if (WARM_UP_SECONDS > 0) await drive(baseUrl, cookie, WARM_UP_SECONDS, FLOOR)
  const results = []
  for (const path of paths) {
    if (WARM_UP_SECONDS > 0) await drive(baseUrl, cookie, WARM_UP_SECONDS, path)
    const rounds = []
    for (let i = 0; i < ROUNDS; i++) {
      const floor = await drive(baseUrl, cookie, SECONDS, FLOOR)
      const route = await drive(baseUrl, cookie, SECONDS, path)
      rounds.push({ floor, route, ratio: route.rps / floor.rps })
    }
    results.push({
      label: `GET ${path}`, rps: median(rounds.map(r => r.route.rps)), p95: median(rounds.map(r => r.route.p95)),
      floor: median(rounds.map(r => r.floor.rps)), ratio: median(rounds.map(r => r.ratio)), low: Math.min(...rounds.map(r => r.ratio)),
      errors: rounds.reduce((n, r) => n + r.route.errors + r.floor.errors, 0),
      detail: rounds.map(r => [r.floor.detail, r.route.detail].filter(Boolean).join(', ')).filter(Boolean).join('; '),
    })
  }
  const head = `${'route'.padEnd(52)} ${'req/s'.padStart(7)} ${'p95 ms'.padStart(7)} ${'floor'.padStart(6)} ${'errors'.padStart(7)} ${'× floor'.padStart(8)} ${'lowest'.padStart(7)}  target`
  console.log(`${head}\n${'─'.repeat(head.length + 12)}`)
  let missed = 0
  for (const r of results) {
    const met = r.ratio >= TARGET && r.errors === 0
    if (!met) missed++
    console.log(`${r.label.padEnd(52)} ${r.rps.toFixed(0).padStart(7)} ${r.p95.toFixed(1).padStart(7)} ${r.floor.toFixed(0).padStart(6)} ${String(r.errors).padStart(7)} ${r.ratio.toFixed(2).padStart(8)} ${r.low.toFixed(2).padStart(7)}  ${met ? `≥ ${TARGET}× met` : `≥ ${TARGET}× MISSED`}`)
    if (r.errors) console.log(`    non-200 or failed: ${r.detail}`)
  }
  console.log(`\nload average ${load()} after the run; ${missed} route(s) below ${TARGET}× the floor (the median of ${ROUNDS} paired rounds)`)
  if (missed) process.exitCode = 1
}
