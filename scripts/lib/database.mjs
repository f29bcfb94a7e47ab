// Migrations and the demo seed, run from the scripts (outside the server) through jiti, which loads
// the same TypeScript modules the server is built from.
import { createJiti } from 'jiti'
import { JITI_OPTIONS } from './config.mjs'

const jiti = createJiti(import.meta.url, JITI_OPTIONS)

/**
 * A function hashing a password with THE server's scrypt parameters (server/services/accounts/password-hashing.ts,
 * the one definition), so sign-in verifies these hashes and never needs to re-hash them.
 */
export function makePasswordHasher() {
  let hash
  return async (plain) => {
    hash ??= jiti.import('../../server/services/accounts/password-hashing.ts').then(m => m.createPasswordHash())
    return (await hash).make(plain)
  }
}

/** The role a PostgreSQL URL connects as ('' when the URL names none). */
export function roleOf(url) {
  try {
    return decodeURIComponent(new URL(url).username)
  }
  catch {
    return ''
  }
}

/**
 * Applies pending migrations as the owner (`ownerUrl`, default `databaseUrl`), grants the
 * application's role (the one `databaseUrl` connects as) its rights when it is another role, and,
 * when `seed` is set, applies the idempotent demo seed.
 */
export async function prepareDatabase({ databaseUrl, ownerUrl = databaseUrl, publicUrl, seed = true, log = console.log }) {
  const { createSequelize } = await jiti.import('../../server/models/index.ts')
  const { migrateUp } = await jiti.import('../../server/database/migrator.ts')
  const { grantAppRole } = await jiti.import('../../server/database/grants.ts')
  const sequelize = createSequelize(ownerUrl)
  try {
    const applied = await migrateUp(sequelize)
    log(applied.length ? `• migrations applied: ${applied.join(', ')}` : '• database schema is current')
    const appRole = roleOf(databaseUrl)
    if (appRole && appRole !== roleOf(ownerUrl)) {
      await grantAppRole(sequelize, appRole)
      log(`• the app connects as ${appRole}: read and append only on the audit trail`)
    }
    else {
      log('• the app connects as the owner of the tables; set NUXT_DATABASE_OWNER_URL to keep the audit trail append-only for it too')
    }
    if (seed) {
      const { seedDemo } = await jiti.import('../../server/database/seeds/index.ts')
      await seedDemo(sequelize, { hashPassword: makePasswordHasher(), publicUrl })
      log('• demo club seeded (idempotent)')
    }
  }
  finally {
    await sequelize.close()
  }
}
