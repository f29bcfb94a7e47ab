#!/usr/bin/env node
// `npm run tier:initial -- --email officer@club.example [--club "Club name"]`: the first T4 of a club
// that has never had one. Prerequisites are waived, the grant is marked initial and audited; once any
// T4 has existed in the club the command refuses (later T4s are signed off by a safety officer holding T4).
import { parseArgs } from 'node:util'
import { createJiti } from 'jiti'
import { DEV, JITI_OPTIONS, loadDotEnv } from './lib/config.mjs'
import { APP_ROLE, OWNER_ROLE } from './lib/postgres.mjs'
import { databaseUrls } from './lib/setup.mjs'

const USAGE = `Usage: npm run tier:initial -- --email officer@club.example [--club "Club name"]

  --email   the member who receives the club's first T4 (prerequisites waived, marked initial)
  --club    the club, when the account belongs to several

The database is NUXT_DATABASE_OWNER_URL (or NUXT_DATABASE_URL) from the environment or .env;
without either, the private cluster of a running \`npm start\`.`

const jiti = createJiti(import.meta.url, JITI_OPTIONS)

class UsageError extends Error {}

async function main() {
  const { values: opts } = parseArgs({ options: { email: { type: 'string' }, club: { type: 'string' }, help: { type: 'boolean', default: false } } })
  if (opts.help) return console.log(USAGE)
  const { emailField } = await jiti.import('../shared/schemas/common.ts')
  const email = emailField.safeParse(opts.email ?? '')
  if (!email.success) throw new UsageError(`--email: ${email.error.issues[0].message}.`)
  const clubName = opts.club?.trim() || undefined
  const env = { ...loadDotEnv(), ...process.env }
  const privateCluster = {
    ownerUrl: `postgres://${OWNER_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`,
    appUrl: `postgres://${APP_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`,
  }
  const { ownerUrl } = databaseUrls({ env, cluster: privateCluster })
  const { createSequelize } = await jiti.import('../server/models/index.ts')
  const { grantInitialTier, InitialTierRefusal } = await jiti.import('../server/database/initial-tier.ts')
  const sequelize = createSequelize(ownerUrl)
  try {
    const outcome = await grantInitialTier(sequelize, { email: email.data, clubName })
    console.log(`✔ ${email.data} holds T4 in ${outcome.clubName} (initial, valid through ${outcome.expiresOn}).`)
    console.log('  Further T4s are signed off on the member page by a safety officer holding T4.')
  }
  catch (error) {
    if (error instanceof InitialTierRefusal) throw new UsageError(error.message)
    if (/ECONNREFUSED|ConnectionRefused/.test(`${error.name} ${error.message}`) && !env.NUXT_DATABASE_URL) {
      throw new UsageError('The private PostgreSQL is not running: start `npm start` first, or set NUXT_DATABASE_URL.')
    }
    throw error
  }
  finally {
    await sequelize.close()
  }
}

try {
  await main()
}
catch (error) {
  console.error(`✖ ${error.message}`)
  if (!(error instanceof UsageError)) console.error(error.stack)
  process.exit(1)
}
