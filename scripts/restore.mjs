#!/usr/bin/env node
// `npm run restore -- <folder> [--replace]`: a backup of `npm run backup` into an empty database and
// uploads folder (refusing ones that hold data unless --replace), as a list of named steps run in
// order: nothing is changed before every check has passed. Stop the server before restoring.
import { existsSync, renameSync } from 'node:fs'
import { resolve } from 'node:path'
import { parseArgs } from 'node:util'
import { createJiti } from 'jiti'
import pg from 'pg'
import { DEV, JITI_OPTIONS, loadDotEnv } from './lib/config.mjs'
import { APP_ROLE, OWNER_ROLE, startPostgres } from './lib/postgres.mjs'
import { databaseUrls } from './lib/setup.mjs'
import {
  BackupError, backupSettings, checkClient, clientBinDir, countDifferences, extractUploads, folderHasFiles,
  readBackup, restoreDump, roleOfUrl, serverMajorOf, tableRowCounts,
} from './lib/backup.mjs'

const USAGE = `Usage: npm run restore -- <backup folder> [--replace]

Restores a folder written by \`npm run backup\` into the database and the uploads folder. Both must be
empty; --replace deletes the database's contents first and moves the uploads folder aside.

The database is NUXT_DATABASE_OWNER_URL (the owner) and NUXT_DATABASE_URL (the application) from the
environment or .env; without either, the private cluster of \`npm start\` (stop it first). The uploads
folder is NUXT_UPLOADS_DIR.`

const jiti = createJiti(import.meta.url, JITI_OPTIONS)

/** Opens a pg client on `url`; when its database does not exist, on the server's "postgres" database instead (with `missing: true`). */
async function connect(url) {
  const client = new pg.Client({ connectionString: url })
  try {
    await client.connect()
    return { client, missing: false }
  }
  catch (error) {
    if (error.code !== '3D000') throw error
    const other = new URL(url)
    other.pathname = '/postgres'
    const fallback = new pg.Client({ connectionString: other.toString() })
    await fallback.connect()
    return { client: fallback, missing: true }
  }
}

/** Runs `work` with a pg client on `url`, closing it after. */
async function withClient(url, work) {
  const { client, missing } = await connect(url)
  try {
    return await work(client, missing)
  }
  finally {
    await client.end()
  }
}

/** Whether the database holds rows (the migrations' bookkeeping aside) or any table at all. */
async function contentsOf(client) {
  const counts = await tableRowCounts(client)
  const rows = Object.entries(counts).filter(([t]) => t !== 'schema_migrations').reduce((n, [, c]) => n + c, 0)
  return { tables: Object.keys(counts).length, rows }
}

/**
 * The restore, step by step. Each step is { name, run(ctx) }; ctx holds the settings, the manifest
 * once read, and `sequelize` (the owner's connection to the restored database) for steps that use
 * the server's own modules.
 */
function restoreSteps({ folder, replace, ownerUrl, appUrl, uploadsDir, pgBin }) {
  const ownerRole = roleOfUrl(ownerUrl)
  const appRole = roleOfUrl(appUrl)
  return [
    {
      name: 'read the backup and check its files',
      run: async (ctx) => {
        ctx.manifest = await readBackup(folder)
      },
    },
    {
      name: 'create the roles',
      run: () => withClient(ownerUrl, async (client) => {
        // The owner is the role connecting: it exists. The application role owns nothing and may only
        // log in; its rights come after the restore (grantAppRole), so the audit trail stays append-only.
        if (appRole && appRole !== ownerRole) {
          const { rowCount } = await client.query('SELECT 1 FROM pg_roles WHERE rolname = $1', [appRole])
          if (!rowCount) {
            await client.query(`CREATE ROLE ${client.escapeIdentifier(appRole)} LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE NOINHERIT`)
              .catch((error) => {
                throw new BackupError(`The role ${appRole} is missing and ${ownerRole} may not create it (${error.message}): create it as a superuser, then restore again.`)
              })
          }
        }
      }),
    },
    {
      name: 'create the database when missing',
      run: () => withClient(ownerUrl, async (client, missing) => {
        if (missing) await client.query(`CREATE DATABASE ${client.escapeIdentifier(decodeURIComponent(new URL(ownerUrl).pathname.slice(1)))}`)
      }),
    },
    {
      name: 'check the PostgreSQL client',
      run: ctx => withClient(ownerUrl, async (client) => {
        const serverMajor = await serverMajorOf(client)
        ctx.pgRestore = checkClient(clientBinDir(serverMajor, pgBin), 'pg_restore', serverMajor)
        if (ctx.manifest.postgres.serverMajor > serverMajor) {
          throw new BackupError(`The backup comes from PostgreSQL ${ctx.manifest.postgres.serverMajor}; this server runs ${serverMajor}. Restore it into PostgreSQL ${ctx.manifest.postgres.serverMajor} or later.`)
        }
      }),
    },
    {
      name: 'check that the database and the uploads folder are empty',
      run: ctx => withClient(ownerUrl, async (client) => {
        const { tables, rows } = await contentsOf(client)
        const uploadsUsed = folderHasFiles(uploadsDir)
        if ((rows || uploadsUsed) && !replace) {
          const what = [rows && `the database holds ${rows} rows`, uploadsUsed && `the uploads folder ${uploadsDir} holds files`].filter(Boolean).join(' and ')
          throw new BackupError(`Refused: ${what}. A restore goes into an empty database; add --replace to delete what is there (back it up first).`)
        }
        // A migrated database without rows counts as empty; its tables go too. Its erasure list is kept
        // first: a backup older than an erasure must not bring that member back.
        if (tables) {
          const listed = await client.query(`SELECT to_regclass('public.erasures') IS NOT NULL AS present`)
          ctx.priorErasures = listed.rows[0].present
            ? (await client.query('SELECT membership_id AS "membershipId", user_id AS "userId", club_id AS "clubId" FROM erasures')).rows
            : []
          await client.query('DROP SCHEMA public CASCADE')
          await client.query('CREATE SCHEMA public')
          // As a new database's public schema: every role may use it, none may create in it.
          await client.query('GRANT USAGE ON SCHEMA public TO PUBLIC')
        }
        if (uploadsUsed) {
          ctx.movedUploads = `${uploadsDir}.before-restore-${Date.now()}`
          renameSync(uploadsDir, ctx.movedUploads)
        }
      }),
    },
    {
      name: 'restore the database',
      run: ctx => restoreDump(ctx.pgRestore, folder, ownerUrl),
    },
    {
      name: 'compare the row counts with the manifest',
      run: ctx => withClient(ownerUrl, async (client) => {
        const differences = countDifferences(ctx.manifest.tables, await tableRowCounts(client))
        if (differences.length) throw new BackupError(`The restored tables differ from the backup's manifest:\n  ${differences.join('\n  ')}`)
      }),
    },
    {
      name: 'migrate and grant the application role its rights',
      run: async ({ sequelize }) => {
        // A backup of an older version is brought up to this one; then the rights, as after every migration run.
        const { migrateUp } = await jiti.import('../server/database/migrator.ts')
        const { grantAppRole } = await jiti.import('../server/database/grants.ts')
        await migrateUp(sequelize)
        if (appRole && appRole !== ownerRole) await grantAppRole(sequelize, appRole)
      },
    },
    {
      name: 'restore the uploads',
      run: () => extractUploads(folder, uploadsDir),
    },
    {
      // Last, once the rows and the files are back: the backup's erasure list and the replaced
      // database's, so a backup brings no erased member back.
      name: 're-apply the erasure list',
      run: async (ctx) => {
        const { reapplyErasures } = await jiti.import('../server/database/erasures.ts')
        const again = await reapplyErasures(ctx.sequelize, { entries: ctx.priorErasures ?? [], uploadsDir })
        if (again) console.log(`  ${again} erased member(s) the backup held were erased again`)
      },
    },
  ]
}

async function main() {
  const { values: opts, positionals } = parseArgs({
    allowPositionals: true,
    options: { replace: { type: 'boolean', default: false }, help: { type: 'boolean', default: false } },
  })
  if (opts.help) return console.log(USAGE)
  if (positionals.length !== 1) throw new BackupError(USAGE)
  const folder = resolve(positionals[0])
  if (!existsSync(folder)) throw new BackupError(`${folder} does not exist`)
  const env = { ...loadDotEnv(), ...process.env }
  const { uploadsDir, pgBin } = backupSettings(env)
  let stopCluster
  if (!env.NUXT_DATABASE_URL) {
    // The private cluster: started here (it creates the owner and application roles) when not running.
    const running = await withClient(`postgres://${OWNER_ROLE}@127.0.0.1:${DEV.pgPort}/postgres`, () => true).catch(() => false)
    if (running) console.log('• the private PostgreSQL is running: make sure the server (npm start) is stopped')
    else stopCluster = startPostgres({ dir: DEV.pgDir, port: DEV.pgPort, database: DEV.database }).stop
  }
  const { databaseUrl: appUrl, ownerUrl } = databaseUrls({
    env,
    cluster: { ownerUrl: `postgres://${OWNER_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`, appUrl: `postgres://${APP_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}` },
  })
  const { createSequelize } = await jiti.import('../server/models/index.ts')
  const ctx = { sequelize: createSequelize(ownerUrl) }
  try {
    for (const step of restoreSteps({ folder, replace: opts.replace, ownerUrl, appUrl, uploadsDir, pgBin })) {
      console.log(`• ${step.name}…`)
      await step.run(ctx)
    }
  }
  finally {
    await ctx.sequelize.close()
    stopCluster?.()
  }
  const rows = Object.values(ctx.manifest.tables).reduce((a, b) => a + b, 0)
  console.log(`✔ restored ${folder} (${ctx.manifest.createdAt}, version ${ctx.manifest.app.version}): ${rows} rows, ${ctx.manifest.uploads.files} uploaded files into ${uploadsDir}`)
  if (ctx.movedUploads) console.log(`  the former uploads folder was moved to ${ctx.movedUploads}`)
  console.log('  Sessions of the backup are void unless NUXT_SESSION_PASSWORD (.env) is the one it was made with: members sign in again otherwise.')
}

try {
  await main()
}
catch (error) {
  console.error(`✖ ${error.message}`)
  if (!(error instanceof BackupError)) console.error(error.stack)
  process.exit(1)
}
