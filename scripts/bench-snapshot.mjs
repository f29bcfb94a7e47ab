#!/usr/bin/env node
// `npm run bench:snapshot`: how long issuing a fill snapshot takes for a club of 2 000 members (a
// benchmark, not a test). A scratch PostgreSQL in .local/bench-snapshot (ports from
// HOOPWISE_TEST_PORT_OFFSET, spare +12..+14) with the demo club plus 2 000 invented members, each with
// a tier, two courses and a bottle in service with a passed proof; 20 000 fills at past events; an
// event today with the demo safety officer on its staff. Then POST /api/events/[id]/fill-snapshots a
// few times, one after the other (the same device: each replaces its reservation): time and size.
import { loadavg } from 'node:os'
import { randomUUID } from 'node:crypto'
import { TEST } from './lib/config.mjs'
import { ensureBuild, startBenchStack } from './lib/bench.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 2_000)
const FILLS = Number(process.env.BENCH_FILLS ?? 20_000)
const RUNS = Number(process.env.BENCH_RUNS ?? 5)
const REUSE_BUILD = process.env.BENCH_REUSE_BUILD === '1'
const PG_PORT = TEST.pgPort + 12
const SMTP_PORT = TEST.spareBase + 13
const APP_PORT = TEST.spareBase + 12

/** The bench members' tiers, courses, vessels, proofs, past fills and today's event; returns the event id. */
async function seedWorld(client) {
  const q = (text, values) => client.query(text, values)
  const [{ club_id: clubId, officer_id: officerId }] = (await q(`SELECT m.club_id, m.id AS officer_id FROM memberships m
    JOIN users u ON u.id = m.user_id WHERE u.email = 'safety@hoopwise.example'`)).rows
  await q(`CREATE TEMP TABLE bench_members AS SELECT m.id, u.name, row_number() OVER (ORDER BY m.id)::int AS n
    FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email LIKE '%@bench.hoopwise.example'`)
  await q(`INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on)
    SELECT $1, id, n % 4, CURRENT_DATE - 400, CURRENT_DATE - (n % 300), CURRENT_DATE - (n % 300) + 365
    FROM bench_members WHERE id <> $2 ON CONFLICT DO NOTHING`, [clubId, officerId])
  await q(`INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to,
      trainer_name, trainer_membership_id, issued_by_membership_id, result, expires_on)
    SELECT $1, b.id, c.id, b.name, c.name, CURRENT_DATE - (b.n % 400), CURRENT_DATE - (b.n % 400), 'Bench trainer', $2, $2, 'pass',
      CURRENT_DATE - (b.n % 400) + 365
    FROM bench_members b CROSS JOIN courses c WHERE b.id <> $2 AND c.club_id = $1 AND c.code IN ('pressure_safety', 'rig_operator')`, [clubId, officerId])
  await q(`INSERT INTO vessels (club_id, owner_membership_id, number, tag, name, construction, volume_l, diameter_mm, state)
    SELECT $1, b.id, 100000 + b.n, 'SRG-' || (100000 + b.n), 'Bench vessel ' || b.n, 'single_bottle', 2, 102, 'in_service' FROM bench_members b`, [clubId])
  await q(`UPDATE clubs SET next_vessel_number = (SELECT max(number) + 1 FROM vessels WHERE club_id = $1) WHERE id = $1`, [clubId])
  await q(`INSERT INTO proof_tests (club_id, vessel_id, witness_membership_id, tested_on, pressure_bar, result, margin_ratio, rated_fill_bar)
    SELECT $1, id, $2, CURRENT_DATE - 30 - (number % 200), 15, 'pass', 1.5, 10 FROM vessels WHERE club_id = $1 AND number > 100000`, [clubId, officerId])
  const [{ id: stationId }] = (await q(`INSERT INTO fill_stations (club_id, name, lowest_part_rating_bar, gauge_name, gauge_calibrated_on, gauge_interval_months)
    VALUES ($1, 'Bench launcher', 75, 'Bench gauge', CURRENT_DATE - 30, 12) RETURNING id`, [clubId])).rows
  await q(`INSERT INTO launch_events (club_id, held_on, site, pressure_cap_bar, created_by_membership_id)
    SELECT $1, CURRENT_DATE - k * 28, 'Bench field ' || k, 25, $2 FROM generate_series(1, 12) AS k`, [clubId, officerId])
  await q(`CREATE TEMP TABLE bench_events AS SELECT id, held_on, row_number() OVER (ORDER BY held_on DESC)::int AS k
    FROM launch_events WHERE club_id = $1 AND site LIKE 'Bench field %'`, [clubId])
  await q(`INSERT INTO launch_event_stations (event_id, club_id, station_id) SELECT id, $1, $2 FROM bench_events`, [clubId, stationId])
  await q(`CREATE TEMP TABLE bench_vessels AS SELECT id, owner_membership_id, row_number() OVER (ORDER BY id)::int AS n
    FROM vessels WHERE club_id = $1 AND number > 100000`, [clubId])
  await q(`INSERT INTO fills (club_id, event_id, held_on, station_id, membership_id, vessel_id, recorded_by_membership_id,
      pressure_bar, entered_pressure, entered_unit, water_volume_l, allowed, permitted_max_bar, limiting_factor, reasons,
      stored_energy_j, tnt_equivalent_kg, minimum_distance_m, created_at)
    SELECT $1, e.id, e.held_on, $2, v.owner_membership_id, v.id, v.owner_membership_id, 6, 6, 'bar', 0.5, true, 10, 'TIER', '[]'::jsonb,
      4000, 0.001, 2.5, e.held_on + interval '10 hours'
    FROM generate_series(1, $3::int) AS i
    JOIN bench_vessels v ON v.n = 1 + i % (SELECT count(*) FROM bench_vessels)
    JOIN bench_events e ON e.k = 1 + i % 12`, [clubId, stationId, FILLS])
  const [{ id: eventId }] = (await q(`INSERT INTO launch_events (club_id, held_on, site, pressure_cap_bar, created_by_membership_id)
    VALUES ($1, CURRENT_DATE, 'Bench field today', 25, $2) RETURNING id`, [clubId, officerId])).rows
  await q('INSERT INTO launch_event_stations (event_id, club_id, station_id) VALUES ($1, $2, $3)', [eventId, clubId, stationId])
  await q('INSERT INTO launch_event_staff (event_id, club_id, membership_id) VALUES ($1, $2, $3)', [eventId, clubId, officerId])
  await q('ANALYZE')
  return eventId
}

async function signInSafety(baseUrl) {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'safety@hoopwise.example', password: 'hoopwise-demo' }),
  })
  if (res.status !== 200) throw new Error(`safety officer sign-in failed: ${res.status}`)
  return res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c.startsWith('nuxt-session='))
}

const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

let stack
try {
  ensureBuild({ rebuild: !REUSE_BUILD })
  stack = await startBenchStack({ name: 'bench-snapshot', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: SMTP_PORT, members: MEMBERS })
  const { client, baseUrl } = stack
  const eventId = await seedWorld(client)
  const cookie = await signInSafety(baseUrl)
  const deviceId = randomUUID()
  console.log(`\nload average ${load()} before the run; ${RUNS} snapshots one after the other\n`)
  const times = []
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now()
    const res = await fetch(new URL(`/api/events/${eventId}/fill-snapshots`, baseUrl), {
      method: 'POST', headers: { 'cookie': cookie, 'content-type': 'application/json', 'origin': baseUrl }, body: JSON.stringify({ deviceId }),
    })
    const body = await res.text()
    const ms = performance.now() - t0
    if (res.status !== 201) throw new Error(`POST fill-snapshots: ${res.status} ${body.slice(0, 300)}`)
    const snapshot = JSON.parse(Buffer.from(JSON.parse(body).snapshot, 'base64').toString('utf8'))
    times.push(ms)
    console.log(`  snapshot ${i + 1}: ${ms.toFixed(0).padStart(6)} ms, ${(body.length / 1024).toFixed(0)} KB, ${snapshot.members.length} members`)
  }
  const sorted = [...times].sort((a, b) => a - b)
  console.log(`\nmedian ${sorted[Math.floor(sorted.length / 2)].toFixed(0)} ms, fastest ${sorted[0].toFixed(0)} ms, slowest ${sorted.at(-1).toFixed(0)} ms (first includes warm-up); load average ${load()} after`)
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  process.exitCode = 1
}
finally {
  await stack?.stop()
}
