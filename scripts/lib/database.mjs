// Migrations and the demo seed, run from the scripts (outside the server) through jiti, which loads
// the same TypeScript modules the server is built from.
import { createJiti } from 'jiti'

const jiti = createJiti(import.meta.url)

/**
 * A function hashing a password with THE server's scrypt parameters (server/services/password-hashing.ts,
 * the one definition), so sign-in verifies these hashes and never needs to re-hash them.
 */
export function makePasswordHasher() {
  let hash
  return async (plain) => {
    hash ??= jiti.import('../../server/services/password-hashing.ts').then(m => m.createPasswordHash())
    return (await hash).make(plain)
  }
}

/** Applies pending migrations and, when `seed` is set, the idempotent demo seed. */
export async function prepareDatabase({ databaseUrl, publicUrl, seed = true, log = console.log }) {
  const { createSequelize } = await jiti.import('../../server/models/index.ts')
  const { migrateUp } = await jiti.import('../../server/database/migrator.ts')
  const sequelize = createSequelize(databaseUrl)
  try {
    const applied = await migrateUp(sequelize)
    log(applied.length ? `• migrations applied: ${applied.join(', ')}` : '• database schema is current')
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
