// The database set-up step of `npm start` and `npm run dev`: which database and roles, migrations and
// grants, and whether the demo club goes in. A function of its own so a test can run it without a build.
import pg from 'pg'
import { prepareDatabase } from './database.mjs'

/** The command that makes the first admin of a database without the demo club. */
export const ADMIN_CREATE_HINT = 'npm run admin:create -- --email you@club.example --club "Club name"'

/**
 * Whether the demo club (with its published password) is seeded: only on the private cluster
 * `npm start` runs, or when HOOPWISE_DEMO=1 says so — and never with NODE_ENV=production, which wins.
 * @param {{ privateCluster: boolean, env: Record<string, string | undefined> }} opts
 */
export function demoWanted({ privateCluster, env }) {
  if (env.NODE_ENV === 'production') return false
  return privateCluster || env.HOOPWISE_DEMO === '1'
}

/** @typedef {{ ownerUrl: string, appUrl: string }} ClusterUrls  the private cluster's two roles (startPostgres) */

/**
 * The application's and the owner's database URLs: NUXT_DATABASE_URL (the app) and
 * NUXT_DATABASE_OWNER_URL (migrations; the app's URL when unset) for a database of your own, else
 * the private cluster's two roles (`cluster` as returned by startPostgres).
 * @param {{ env: Record<string, string | undefined>, cluster?: ClusterUrls }} opts
 */
export function databaseUrls({ env, cluster }) {
  if (env.NUXT_DATABASE_URL) {
    return { databaseUrl: env.NUXT_DATABASE_URL, ownerUrl: env.NUXT_DATABASE_OWNER_URL || env.NUXT_DATABASE_URL, privateCluster: false }
  }
  if (env.NUXT_DATABASE_OWNER_URL) throw new Error('NUXT_DATABASE_OWNER_URL is set without NUXT_DATABASE_URL: set both, or neither for the private cluster')
  if (!cluster) throw new Error('No database: set NUXT_DATABASE_URL, or let npm start run its private cluster')
  return { databaseUrl: cluster.appUrl, ownerUrl: cluster.ownerUrl, privateCluster: true }
}

/** Whether the database at `url` holds an admin who may act (not suspended, not resigned). */
export async function adminExists(url) {
  const client = new pg.Client({ connectionString: url })
  await client.connect()
  try {
    const res = await client.query(`SELECT 1 FROM memberships
      WHERE 'admin' = ANY (roles) AND suspended_at IS NULL AND resigned_at IS NULL LIMIT 1`)
    return res.rowCount > 0
  }
  finally {
    await client.end()
  }
}

/**
 * Migrates (as the owner), grants the application role its rights, seeds the demo club only where
 * demoWanted allows, and otherwise — when no admin exists yet — says how to create the first one.
 * `env` is the environment (.env lines under process.env); `cluster` the private cluster, if one runs.
 * Returns the URLs the server and the scripts use and whether the demo club was seeded.
 * @param {{ env: Record<string, string | undefined>, cluster?: ClusterUrls, publicUrl: string, log?: (line: string) => void }} opts
 */
export async function setUpDatabase({ env, cluster, publicUrl, log = console.log }) {
  const { databaseUrl, ownerUrl, privateCluster } = databaseUrls({ env, cluster })
  const seeded = demoWanted({ privateCluster, env })
  await prepareDatabase({ databaseUrl, ownerUrl, publicUrl, seed: seeded, log })
  if (!seeded) {
    log(privateCluster ? '• no demo club (NODE_ENV=production)' : '• a database of your own: no demo club (HOOPWISE_DEMO=1 adds it)')
    if (!(await adminExists(ownerUrl))) {
      log(`• no admin yet. Create the first one (it asks for a password, or add --send-link to e-mail a link):\n    ${ADMIN_CREATE_HINT}`)
    }
  }
  return { databaseUrl, ownerUrl, privateCluster, seeded }
}
