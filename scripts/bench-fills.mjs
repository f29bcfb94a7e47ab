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

/**
 * The fill world, set-based: every bench member active, adult, waiver accepted, T2 and current in the
 * courses T2 relies on; two vessels each in service with a pass 30 days ago (rated 10 bar); twenty past
 * events and today's (the demo instructor on its staff, one launcher); the fills spread over the past
 * events, a tenth of them after the proofs (one or so per vessel, far from the fill limit).
 */
async function seedFillWorld(client) {
  const q = (text, values) => client.query(text, values)
  const [{ club_id: clubId, instructor_id: instructorId }] = (await q(`SELECT m.club_id, m.id AS instructor_id FROM memberships m
    JOIN users u ON u.id = m.user_id WHERE u.email = 'instructor@hoopwise.example'`)).rows
  await q(`UPDATE memberships SET paid_through = CURRENT_DATE + 200, suspended_at = NULL, suspended_reason = NULL, resigned_at = NULL,
      birth_date = DATE '1980-01-01' + (hashtext(id::text) % 3000)
    WHERE user_id IN (SELECT id FROM users WHERE email LIKE '%@bench.hoopwise.example')`)
  await q(`CREATE TEMP TABLE bench_members AS SELECT m.id, u.name, row_number() OVER (ORDER BY m.id)::int AS n
    FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email LIKE '%@bench.hoopwise.example'`)
  await q(`INSERT INTO waiver_acceptances (club_id, waiver_id, membership_id, typed_name)
    SELECT $1, w.id, b.id, b.name FROM bench_members b
    CROSS JOIN (SELECT id FROM waivers WHERE club_id = $1 ORDER BY version DESC LIMIT 1) w
    ON CONFLICT DO NOTHING`, [clubId])
  await q(`INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on)
    SELECT $1, id, 2, CURRENT_DATE - 100, CURRENT_DATE - 100, CURRENT_DATE + 600 FROM bench_members
    ON CONFLICT DO NOTHING`, [clubId])
  await q(`INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on)
    VALUES ($1, $2, 3, CURRENT_DATE - 100, CURRENT_DATE - 100, CURRENT_DATE + 200) ON CONFLICT DO NOTHING`, [clubId, instructorId])
  await q(`INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to,
      trainer_name, trainer_membership_id, issued_by_membership_id, result, expires_on)
    SELECT $1, b.id, c.id, b.name, c.name, CURRENT_DATE - 50, CURRENT_DATE - 50, 'Bench trainer', $2, $2, 'pass', CURRENT_DATE + 300
    FROM bench_members b CROSS JOIN courses c WHERE c.club_id = $1 AND c.code IN ('pressure_safety', 'rig_operator')`, [clubId, instructorId])
  await q(`INSERT INTO vessels (club_id, owner_membership_id, number, tag, name, construction, volume_l, diameter_mm, state)
    SELECT $1, b.id, 100000 + i, 'SRG-' || (100000 + i), 'Bench vessel ' || i, 'single_bottle', 2, 102, 'in_service'
    FROM generate_series(1, $2::int) AS i JOIN bench_members b ON b.n = 1 + (i - 1) % (SELECT count(*) FROM bench_members)`, [clubId, VESSELS])
  await q(`UPDATE clubs SET next_vessel_number = (SELECT max(number) + 1 FROM vessels WHERE club_id = $1) WHERE id = $1`, [clubId])
  await q(`INSERT INTO proof_tests (club_id, vessel_id, witness_membership_id, tested_on, pressure_bar, result, margin_ratio, rated_fill_bar)
    SELECT $1, id, $2, CURRENT_DATE - 30, 15, 'pass', 1.5, 10 FROM vessels WHERE club_id = $1 AND number > 100000`, [clubId, instructorId])
  const [{ id: stationId }] = (await q(`INSERT INTO fill_stations (club_id, name, lowest_part_rating_bar, gauge_name, gauge_calibrated_on, gauge_interval_months)
    VALUES ($1, 'Bench launcher', 75, 'Bench gauge', CURRENT_DATE - 30, 12) RETURNING id`, [clubId])).rows
  const [{ id: eventId }] = (await q(`INSERT INTO launch_events (club_id, held_on, site, pressure_cap_bar, created_by_membership_id)
    VALUES ($1, CURRENT_DATE, 'Bench field', 25, $2) RETURNING id`, [clubId, instructorId])).rows
  await q('INSERT INTO launch_event_stations (event_id, club_id, station_id) VALUES ($1, $2, $3)', [eventId, clubId, stationId])
  await q('INSERT INTO launch_event_staff (event_id, club_id, membership_id) VALUES ($1, $2, $3)', [eventId, clubId, instructorId])
  // Twenty past events, 10 to 600 days ago: the last (10 days ago) after the proofs.
  await q(`INSERT INTO launch_events (club_id, held_on, site, pressure_cap_bar, created_by_membership_id)
    SELECT $1, CURRENT_DATE - (10 + (k - 1) * 30), 'Bench field', 25, $2 FROM generate_series(1, 20) AS k`, [clubId, instructorId])
  await q(`INSERT INTO launch_event_stations (event_id, club_id, station_id)
    SELECT id, club_id, $2 FROM launch_events WHERE club_id = $1 AND held_on < CURRENT_DATE`, [clubId, stationId])
  await q(`CREATE TEMP TABLE bench_events AS SELECT id, held_on, row_number() OVER (ORDER BY held_on DESC)::int AS k
    FROM launch_events WHERE club_id = $1 AND held_on < CURRENT_DATE`, [clubId])
  await q(`CREATE TEMP TABLE bench_vessels AS SELECT id, owner_membership_id, row_number() OVER (ORDER BY id)::int AS n
    FROM vessels WHERE club_id = $1 AND number > 100000`, [clubId])
  // Fill i goes to vessel i mod V and event 1 + i mod 20 (event 1 is the one after the proofs: a tenth of the fills).
  await q(`INSERT INTO fills (club_id, event_id, held_on, station_id, membership_id, vessel_id, recorded_by_membership_id,
      pressure_bar, entered_pressure, entered_unit, water_volume_l, allowed, permitted_max_bar, limiting_factor, reasons,
      stored_energy_j, tnt_equivalent_kg, minimum_distance_m, created_at)
    SELECT $1, e.id, e.held_on, $2, v.owner_membership_id, v.id, v.owner_membership_id,
      6 + (i % 4), 6 + (i % 4), 'bar', 0.5, i % 50 <> 0, 10, 'TIER',
      CASE WHEN i % 50 = 0 THEN '[{"code":"TIER_CAP_EXCEEDED","message":"Bench refusal"}]'::jsonb ELSE '[]'::jsonb END,
      4000, 0.001, 2.5, e.held_on + interval '10 hours'
    FROM generate_series(1, $3::int) AS i
    JOIN bench_vessels v ON v.n = 1 + i % (SELECT count(*) FROM bench_vessels)
    JOIN bench_events e ON e.k = 1 + (i / 7) % 20`, [clubId, stationId, FILLS])
  await q('ANALYZE')
  const pairs = (await q(`SELECT v.owner_membership_id AS "memberId", v.id AS "vesselId" FROM bench_vessels v ORDER BY random() LIMIT 2000`)).rows
  const counts = (await q(`SELECT (SELECT count(*) FROM vessels WHERE state = 'in_service')::int AS vessels, (SELECT count(*) FROM fills)::int AS fills,
    (SELECT count(*) FROM member_tiers)::int AS tiers`)).rows[0]
  console.log(`• ${counts.vessels} vessels in service, ${counts.fills} fills, ${counts.tiers} member tiers`)
  return { eventId, stationId, pairs }
}

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
  const { eventId, stationId, pairs } = await seedFillWorld(client)
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
