// Pieces shared by the benchmarks (`npm run bench:directory`, `npm run bench:api`): a build, a scratch
// PostgreSQL with the demo club plus thousands of invented members, the production server, and the
// demo admin's session cookie. Each benchmark passes its own ports and folder, so they never collide.
import { randomBytes } from 'node:crypto'
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { spawnSync } from 'node:child_process'
import pg from 'pg'
import { ROOT, LOCAL, ensureDir } from './config.mjs'
import { startPostgres, recreateDatabase } from './postgres.mjs'
import { prepareDatabase } from './database.mjs'
import { startAppServer } from './processes.mjs'

const FIRST = ['Odile', 'Bram', 'Cressida', 'Dov', 'Elowen', 'Fenn', 'Gwilym', 'Hollis', 'Ines', 'Jory', 'Kestrel', 'Lorcan',
  'Mirela', 'Nell', 'Osric', 'Pell', 'Quenby', 'Rook', 'Saffi', 'Tamsin', 'Ulric', 'Vesna', 'Wren', 'Xanthe', 'Yestin', 'Zillah']
const LAST = ['Marshcombe', 'Saltreed', 'Ebbridge', 'Fluke', 'Gullyhaven', 'Kelpford', 'Mudlark', 'Oysterby', 'Pebblewick',
  'Reedmere', 'Samphire', 'Shinglebank', 'Spartina', 'Tidemark', 'Wadeholm', 'Wickerwade', 'Cordgrass', 'Brackenfen', 'Holloway']

/** Adds `count` invented members to the demo club in two set-based INSERTs, in every status. */
export async function insertMembers(client, count) {
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

/**
 * Builds the production server with `nuxt build`: always when `rebuild` is set, else only when no
 * build exists yet.
 */
export function ensureBuild({ rebuild }) {
  const built = existsSync(join(ROOT, '.output/server/index.mjs'))
  if (built && !rebuild) {
    console.log('• reusing the existing build in .output/')
    return
  }
  console.log('• building (nuxt build)…')
  const result = spawnSync('npx', ['nuxt', 'build'], { cwd: ROOT, stdio: 'inherit' })
  if (result.status !== 0) throw new Error('nuxt build failed')
}

/** Signs the demo admin in on the server at `baseUrl`; returns the `nuxt-session=…` cookie pair. */
export async function signInDemoAdmin(baseUrl) {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'admin@hoopwise.example', password: 'hoopwise-demo' }),
  })
  if (res.status !== 200) throw new Error(`admin sign-in failed: ${res.status}`)
  return res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c.startsWith('nuxt-session='))
}

/**
 * A scratch cluster in `.local/<name>/pg` on `pgPort` with a fresh database: migrated, the demo club
 * seeded, `members` invented members added. With `appPort` it also starts the production server
 * (NODE_ENV=production) on it, connected as `role` ('app', the application role the server uses in
 * production, or 'owner'), with `env` added to its environment. Returns { client (owner connection), ownerUrl, databaseUrl, baseUrl, stop }.
 */
export async function startBenchStack({ name, pgPort, appPort, smtpPort, members, role = 'app', env = {} }) {
  const database = 'hoopwise_bench'
  const cluster = startPostgres({ dir: ensureDir(join(LOCAL, name, 'pg')), port: pgPort, database: 'postgres', fast: true })
  let client
  let server
  const stop = async () => {
    await client?.end().catch(() => {})
    await server?.stop()
    cluster.stop()
  }
  try {
    recreateDatabase({ port: pgPort, database })
    const ownerUrl = cluster.ownerUrl.replace(/\/postgres$/, `/${database}`)
    const databaseUrl = role === 'app' ? cluster.appUrl.replace(/\/postgres$/, `/${database}`) : ownerUrl
    const baseUrl = `http://127.0.0.1:${appPort}`
    await prepareDatabase({ databaseUrl, ownerUrl, publicUrl: baseUrl, log: () => {} })
    client = new pg.Client({ connectionString: ownerUrl })
    await client.connect()
    const started = performance.now()
    await insertMembers(client, members)
    const { rows: [{ count }] } = await client.query('SELECT count(*)::int AS count FROM memberships')
    console.log(`• ${count} memberships in the scratch database (${members} added in ${Math.round(performance.now() - started)} ms)`)
    if (appPort) {
      server = await startAppServer({
        root: ROOT,
        port: appPort,
        env: {
          NODE_ENV: 'production',
          NUXT_DATABASE_URL: databaseUrl,
          NUXT_SESSION_PASSWORD: randomBytes(32).toString('hex'),
          NUXT_PUBLIC_URL: baseUrl,
          NUXT_SMTP_HOST: '127.0.0.1',
          NUXT_SMTP_PORT: String(smtpPort),
          ...env,
        },
      })
    }
    return { client, ownerUrl, databaseUrl, baseUrl, stop }
  }
  catch (error) {
    await stop()
    throw error
  }
}
