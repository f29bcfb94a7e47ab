// The fill benchmark's world (bench:fills and bench:desk seed it the same way).

/**
 * The fill world, set-based: every bench member active, adult, waiver accepted, T2 and current in the
 * courses T2 relies on; two vessels each in service with a pass 30 days ago (rated 10 bar); twenty past
 * events and today's (the demo instructor on its staff, one launcher); the fills spread over the past
 * events, a tenth of them after the proofs (one or so per vessel, far from the fill limit). `vessels` and
 * `fills` say how many.
 */
export async function seedFillWorld(client, { vessels, fills }) {
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
    FROM generate_series(1, $2::int) AS i JOIN bench_members b ON b.n = 1 + (i - 1) % (SELECT count(*) FROM bench_members)`, [clubId, vessels])
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
      stored_energy_j, tnt_equivalent_kg, minimum_distance_m, created_at, tier_rank)
    SELECT $1, e.id, e.held_on, $2, v.owner_membership_id, v.id, v.owner_membership_id,
      6 + (i % 4), 6 + (i % 4), 'bar', 0.5, i % 50 <> 0, 10, 'TIER',
      CASE WHEN i % 50 = 0 THEN '[{"code":"TIER_CAP_EXCEEDED","message":"Bench refusal"}]'::jsonb ELSE '[]'::jsonb END,
      4000, 0.001, 2.5, e.held_on + interval '10 hours', (SELECT max(t.rank) FROM member_tiers t WHERE t.membership_id = v.owner_membership_id AND t.first_granted_on <= e.held_on AND t.expires_on >= e.held_on AND t.revoked_at IS NULL AND t.confirmed_at IS NOT NULL)
    FROM generate_series(1, $3::int) AS i
    JOIN bench_vessels v ON v.n = 1 + i % (SELECT count(*) FROM bench_vessels)
    JOIN bench_events e ON e.k = 1 + (i / 7) % 20`, [clubId, stationId, fills])
  await q('ANALYZE')
  const pairs = (await q(`SELECT v.owner_membership_id AS "memberId", v.id AS "vesselId" FROM bench_vessels v ORDER BY random() LIMIT 2000`)).rows
  const counts = (await q(`SELECT (SELECT count(*) FROM vessels WHERE state = 'in_service')::int AS vessels, (SELECT count(*) FROM fills)::int AS fills,
    (SELECT count(*) FROM member_tiers)::int AS tiers`)).rows[0]
  console.log(`• ${counts.vessels} vessels in service, ${counts.fills} fills, ${counts.tiers} member tiers`)
  return { eventId, stationId, pairs }
}
