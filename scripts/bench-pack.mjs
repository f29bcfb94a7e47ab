#!/usr/bin/env node
// `npm run bench:pack`: how long the evidence pack takes to render for a club of 2 000 members (a
// benchmark, not a test). One build, a scratch PostgreSQL in .local/bench-pack (ports from
// HOOPWISE_TEST_PORT_OFFSET) with the demo club plus 2 000 invented members, each holding a tier and two
// courses; 500 vessels in service with a passed proof; 12 launch events in the last year with 20 000
// fills (one in fifty refused); 30 incidents. The production server as the application role and the
// demo admin signed in. Then GET /api/audit/evidence-pack a few times, one after the other: the time of
// each, the PDF's size and pages.
import { loadavg } from 'node:os'
import { TEST } from './lib/config.mjs'
import { ensureBuild, signInDemoAdmin, startBenchStack } from './lib/bench.mjs'

const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 2_000)
const VESSELS = Number(process.env.BENCH_VESSELS ?? 500)
const FILLS = Number(process.env.BENCH_FILLS ?? 20_000)
const RUNS = Number(process.env.BENCH_RUNS ?? 5)
const REUSE_BUILD = process.env.BENCH_REUSE_BUILD === '1'
// Ports of this benchmark alone.
const PG_PORT = TEST.pgPort + 11
const SMTP_PORT = TEST.spareBase + 11
const APP_PORT = TEST.spareBase + 10

/** The club's records, set-based, for the bench members of the demo club. */
async function seedPackWorld(client) {
  const q = (text, values) => client.query(text, values)
  const [{ club_id: clubId, officer_id: officerId }] = (await q(`SELECT m.club_id, m.id AS officer_id FROM memberships m
    JOIN users u ON u.id = m.user_id WHERE u.email = 'safety@hoopwise.example'`)).rows
  await q(`CREATE TEMP TABLE bench_members AS SELECT m.id, u.name, row_number() OVER (ORDER BY m.id)::int AS n
    FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email LIKE '%@bench.hoopwise.example'`)
  await q(`INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on, suspended_at, suspension_reason, suspended_by_membership_id)
    SELECT $1, id, n % 4, CURRENT_DATE - 400, CURRENT_DATE - (n % 300), CURRENT_DATE - (n % 300) + 365,
      CASE WHEN n % 40 = 0 THEN now() END, CASE WHEN n % 40 = 0 THEN 'Bench suspension' END, CASE WHEN n % 40 = 0 THEN $2::uuid END
    FROM bench_members WHERE id <> $2 ON CONFLICT DO NOTHING`, [clubId, officerId])
  await q(`INSERT INTO training_records (club_id, membership_id, course_id, trainee_name, subject, trained_from, trained_to,
      trainer_name, trainer_membership_id, issued_by_membership_id, result, expires_on)
    SELECT $1, b.id, c.id, b.name, c.name, CURRENT_DATE - (b.n % 400), CURRENT_DATE - (b.n % 400), 'Bench trainer', $2, $2, 'pass',
      CURRENT_DATE - (b.n % 400) + 365
    FROM bench_members b CROSS JOIN courses c WHERE b.id <> $2 AND c.club_id = $1 AND c.code IN ('pressure_safety', 'rig_operator')`, [clubId, officerId])
  await q(`INSERT INTO vessels (club_id, owner_membership_id, number, tag, name, construction, volume_l, diameter_mm, state)
    SELECT $1, b.id, 100000 + i, 'SRG-' || (100000 + i), 'Bench vessel ' || i, 'single_bottle', 2, 102, 'in_service'
    FROM generate_series(1, $2::int) AS i JOIN bench_members b ON b.n = 1 + (i - 1) % (SELECT count(*) FROM bench_members)`, [clubId, VESSELS])
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
      stored_energy_j, tnt_equivalent_kg, minimum_distance_m, created_at, tier_rank)
    SELECT $1, e.id, e.held_on, $2, v.owner_membership_id, v.id, v.owner_membership_id,
      6 + (i % 4), 6 + (i % 4), 'bar', 0.5, i % 50 <> 0, 10, 'TIER',
      CASE WHEN i % 50 = 0 THEN '[{"code":"TIER_CAP_EXCEEDED","message":"Bench refusal"}]'::jsonb ELSE '[]'::jsonb END,
      4000, 0.001, 2.5, e.held_on + interval '10 hours', (SELECT max(t.rank) FROM member_tiers t WHERE t.membership_id = v.owner_membership_id AND t.first_granted_on <= e.held_on AND t.expires_on >= e.held_on AND t.revoked_at IS NULL AND t.confirmed_at IS NOT NULL)
    FROM generate_series(1, $3::int) AS i
    JOIN bench_vessels v ON v.n = 1 + i % (SELECT count(*) FROM bench_vessels)
    JOIN bench_events e ON e.k = 1 + i % 12`, [clubId, stationId, FILLS])
  await q(`INSERT INTO incidents (club_id, reported_by_membership_id, kind, happened_at, place, what_happened, status, findings, actions, closed_at, closed_by_membership_id)
    SELECT $1, $2, (ARRAY['burst', 'uncommanded_launch', 'near_miss', 'other'])[1 + k % 4], now() - make_interval(days => k * 11), 'Bench field',
      'Bench incident ' || k, CASE WHEN k % 3 = 0 THEN 'open' ELSE 'closed' END,
      CASE WHEN k % 3 = 0 THEN '' ELSE 'The vessel was past its fill limit.' END, CASE WHEN k % 3 = 0 THEN '' ELSE 'Retest before the next event.' END,
      CASE WHEN k % 3 = 0 THEN NULL ELSE now() - make_interval(days => k * 11 - 2) END, CASE WHEN k % 3 = 0 THEN NULL ELSE $2::uuid END
    FROM generate_series(1, 30) AS k`, [clubId, officerId])
  await q('ANALYZE')
}

const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

let stack
try {
  ensureBuild({ rebuild: !REUSE_BUILD })
  stack = await startBenchStack({ name: 'bench-pack', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: SMTP_PORT, members: MEMBERS })
  const { client, baseUrl } = stack
  const started = performance.now()
  await seedPackWorld(client)
  console.log(`• pack world seeded in ${Math.round(performance.now() - started)} ms`)
  const cookie = await signInDemoAdmin(baseUrl)
  console.log(`\nload average ${load()} before the run; ${RUNS} packs one after the other\n`)
  const times = []
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now()
    const res = await fetch(new URL('/api/audit/evidence-pack', baseUrl), { headers: { cookie } })
    const pdf = Buffer.from(await res.arrayBuffer())
    const ms = performance.now() - t0
    if (res.status !== 200) throw new Error(`GET /api/audit/evidence-pack: ${res.status} ${pdf.toString('utf8').slice(0, 300)}`)
    const pages = pdf.toString('latin1').match(/\/Type \/Page\b/g)?.length ?? 0
    times.push(ms)
    console.log(`  pack ${i + 1}: ${ms.toFixed(0).padStart(6)} ms, ${(pdf.length / 1024).toFixed(0)} KB, ${pages} pages`)
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
