#!/usr/bin/env node
// `npm run backup`: the database (pg_dump, custom format) and the uploads folder into a dated folder
// under HOOPWISE_BACKUP_DIR with a manifest; keeps the newest HOOPWISE_BACKUP_KEEP. The session secret
// in .env is not part of it (keep that file separately). `npm start` runs this nightly when
// HOOPWISE_BACKUP_AT is set.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { parseArgs } from 'node:util'
import { DEV, ROOT, loadDotEnv } from './lib/config.mjs'
import { APP_ROLE, OWNER_ROLE } from './lib/postgres.mjs'
import { databaseUrls } from './lib/setup.mjs'
import { BackupError, backupSettings, createBackup } from './lib/backup.mjs'

const USAGE = `Usage: npm run backup

Writes the database and the uploads folder into a new folder under HOOPWISE_BACKUP_DIR (default
.local/backups) and deletes the oldest beyond HOOPWISE_BACKUP_KEEP (default 7).

The database is NUXT_DATABASE_OWNER_URL (or NUXT_DATABASE_URL) from the environment or .env;
without either, the private cluster of a running \`npm start\`. The uploads folder is NUXT_UPLOADS_DIR.`

async function main() {
  const { values: opts } = parseArgs({ options: { help: { type: 'boolean', default: false } } })
  if (opts.help) return console.log(USAGE)
  const env = { ...loadDotEnv(), ...process.env }
  const settings = backupSettings(env)
  const privateCluster = {
    ownerUrl: `postgres://${OWNER_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`,
    appUrl: `postgres://${APP_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`,
  }
  const { databaseUrl, ownerUrl } = databaseUrls({ env, cluster: privateCluster })
  const { version } = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'))
  try {
    const { folder, manifest, pruned } = await createBackup({ ownerUrl, appUrl: databaseUrl, appVersion: version, ...settings })
    const rows = Object.values(manifest.tables).reduce((a, b) => a + b, 0)
    console.log(`✔ backup written to ${folder}`)
    console.log(`  ${Object.keys(manifest.tables).length} tables, ${rows} rows, ${manifest.uploads.files} uploaded files; PostgreSQL ${manifest.postgres.serverVersion}`)
    if (pruned.length) console.log(`  deleted the oldest (keeping ${settings.keep}): ${pruned.join(', ')}`)
    console.log('  The session secret (.env) is not in it: keep a copy of .env somewhere else.')
  }
  catch (error) {
    if (/ECONNREFUSED|ConnectionRefused/.test(`${error.name} ${error.message}`)) {
      throw new BackupError(env.NUXT_DATABASE_URL
        ? `PostgreSQL does not answer at ${new URL(ownerUrl).host}: is it running?`
        : 'The private PostgreSQL is not running: start `npm start` first, or set NUXT_DATABASE_URL.')
    }
    throw error
  }
}

try {
  await main()
}
catch (error) {
  console.error(`✖ ${error.message}`)
  if (!(error instanceof BackupError)) console.error(error.stack)
  process.exit(1)
}
