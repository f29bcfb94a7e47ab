// `npm run backup` and `npm run restore`, run as commands (slow: each restore runs pg_restore and the migrations): the demo club (with a photo) is backed up
// from a database of this file's own, restored into a fresh database and a fresh uploads folder, and a
// server on the restored database shows the demo member what the first one did.
import { execFile } from 'node:child_process'
import { chmodSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import pg from 'pg'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { LOCAL, ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { APP_ROLE, OWNER_ROLE, recreateDatabase } from '../../../scripts/lib/postgres.mjs'
import { prepareDatabase } from '../../../scripts/lib/database.mjs'
import { startAppServer } from '../../../scripts/lib/processes.mjs'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { signIn } from '../../support/global-setup'
import { DEMO, serverEnv } from '../../support/test-env'
import type { Paged } from '../../../shared/types/common'
import type { PhotoDto } from '../../../shared/types/photos'
import type { VesselListItemDto } from '../../../shared/types/vessels'

// Spare ports no other test file uses (they run side by side).
const SOURCE_PORT = TEST.spareBase + 16
const RESTORED_PORT = TEST.spareBase + 17
const WORK = join(LOCAL, 'test', 'backup-restore')
const BACKUPS = join(WORK, 'backups')
const urls = (database: string) => ({
  owner: `postgres://${OWNER_ROLE}@127.0.0.1:${TEST.pgPort}/${database}`,
  app: `postgres://${APP_ROLE}@127.0.0.1:${TEST.pgPort}/${database}`,
  uploads: join(WORK, `${database}-uploads`),
  baseUrl: `http://127.0.0.1:${database.endsWith('source') ? SOURCE_PORT : RESTORED_PORT}`,
})
const source = urls('hoopwise_backup_source')
const restored = urls('hoopwise_backup_restored')

type Run = { code: number, stdout: string, stderr: string }
/** Runs one of the project's commands (scripts/<name>.mjs) against `target`, as whoever runs the server would. */
function command(name: 'backup' | 'restore', args: string[], target: typeof source, env: Record<string, string> = {}): Promise<Run> {
  return new Promise(resolve => execFile(process.execPath, [join(ROOT, 'scripts', `${name}.mjs`), ...args], {
    cwd: ROOT,
    env: {
      ...process.env,
      NUXT_DATABASE_URL: target.app,
      NUXT_DATABASE_OWNER_URL: target.owner,
      NUXT_UPLOADS_DIR: target.uploads,
      HOOPWISE_BACKUP_DIR: BACKUPS,
      HOOPWISE_BACKUP_KEEP: '7',
      HOOPWISE_PG_BIN: '',
      ...env,
    },
  }, (error, stdout, stderr) => resolve({ code: error ? Number(error.code ?? 1) : 0, stdout, stderr })))
}

/** Rows of every table of the public schema, by table. */
async function rowCounts(databaseUrl: string): Promise<Record<string, number>> {
  const tables = await sql<{ name: string }>(`SELECT tablename AS name FROM pg_tables WHERE schemaname = 'public' ORDER BY 1`, [], databaseUrl)
  const counts: Record<string, number> = {}
  for (const { name } of tables) {
    const [row] = await sql<{ n: string }>(`SELECT count(*) AS n FROM "${name}"`, [], databaseUrl)
    counts[name] = Number(row!.n)
  }
  return counts
}

/** What the demo member sees on a server: standing, vessels, the first vessel's photos and that photo's bytes. */
async function memberView(baseUrl: string) {
  const cookie = await signIn(baseUrl, DEMO.member, DEMO.password)
  const standing = await api('/api/me/standing', { baseUrl, as: cookie })
  const vessels = await api<Paged<VesselListItemDto>>('/api/vessels', { baseUrl, as: cookie, query: { pageSize: 100 } })
  const vesselId = vessels.body.items[0]!.id
  const photos = await api<PhotoDto[]>(`/api/vessels/${vesselId}/photos`, { baseUrl, as: cookie })
  const bytes = photos.body[0] ? Buffer.from(await (await fetch(`${baseUrl}${photos.body[0].url}`, { headers: { cookie } })).arrayBuffer()) : null
  return { cookie, standing, vessels, vesselId, photos, bytes }
}

const backupFolders = () => (existsSync(BACKUPS) ? readdirSync(BACKUPS).sort() : [])

let server: Awaited<ReturnType<typeof startAppServer>> | undefined
let before: Awaited<ReturnType<typeof memberView>>
let auditEntryId = ''
let backup: Run
let folder = ''

beforeAll(async () => {
  rmSync(WORK, { recursive: true, force: true })
  mkdirSync(WORK, { recursive: true })
  for (const database of ['hoopwise_backup_source', 'hoopwise_backup_restored']) recreateDatabase({ port: TEST.pgPort, database })
  await prepareDatabase({ databaseUrl: source.app, ownerUrl: source.owner, publicUrl: source.baseUrl, seed: true, log: () => {} })

  // The demo club as it runs: its member adds a photo of a vessel on a server of its own.
  server = await startAppServer({ root: ROOT, port: SOURCE_PORT, env: serverEnv({ NUXT_DATABASE_URL: source.app, NUXT_PUBLIC_URL: source.baseUrl, NUXT_UPLOADS_DIR: source.uploads }) })
  const cookie = await signIn(source.baseUrl, DEMO.member, DEMO.password)
  const vessels = await api<Paged<VesselListItemDto>>('/api/vessels', { baseUrl: source.baseUrl, as: cookie, query: { pageSize: 100 } })
  const photo = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 200, g: 80, b: 40 } } }).jpeg().toBuffer()
  const form = new FormData()
  form.append('purpose', 'build')
  form.append('vesselId', vessels.body.items[0]!.id)
  form.append('file', new Blob([new Uint8Array(photo)], { type: 'image/jpeg' }), 'layup.jpg')
  expect((await api('/api/photos', { baseUrl: source.baseUrl, as: cookie, body: form })).status).toBe(201)
  before = await memberView(source.baseUrl)
  await server.stop()
  server = undefined

  // An entry of the audit trail, so its append-only rights have something to guard after the restore.
  const [admin] = await sql<{ id: string, club_id: string }>(`SELECT m.id, m.club_id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [DEMO.admin], source.owner)
  const [entry] = await sql<{ id: string }>(`INSERT INTO audit_events (club_id, actor_membership_id, action, subject_type, subject_id, reason)
    VALUES ($1, $2, 'member.edit', 'membership', $2, 'Kept for the backup test') RETURNING id`, [admin!.club_id, admin!.id], source.owner)
  auditEntryId = entry!.id

  backup = await command('backup', [], source)
  folder = join(BACKUPS, backupFolders()[0] ?? 'none')
}, 300_000)

afterAll(async () => {
  await server?.stop()
})

describe('npm run backup', { timeout: 180_000 }, () => {
  it('writes a dated folder with the dump, the uploads and a manifest counting every table\'s rows', async () => {
    expect(backup.stderr).toBe('')
    expect(backup.code).toBe(0)
    expect(backupFolders()).toEqual([expect.stringMatching(/^hoopwise-\d{4}-\d\d-\d\dT\d\d-\d\d-\d\dZ$/)])
    expect(readdirSync(folder).sort()).toEqual(['database.dump', 'manifest.json', 'uploads.tar.gz'])
    const manifest = JSON.parse(readFileSync(join(folder, 'manifest.json'), 'utf8'))
    expect(manifest).toMatchObject({ app: { name: 'hoopwise' }, postgres: { serverMajor: 15 }, uploads: { files: 2 } })
    expect(manifest.tables).toEqual(await rowCounts(source.owner))
    expect(manifest.tables.photos).toBe(1)
  })
})

describe('npm run restore', { timeout: 180_000 }, () => {
  it('restores into a fresh database and uploads folder: every table has the same rows', async () => {
    const run = await command('restore', [folder], restored)
    expect(run.stderr).toBe('')
    expect(run.code).toBe(0)
    expect(await rowCounts(restored.owner)).toEqual(await rowCounts(source.owner))
    expect(readdirSync(restored.uploads).sort()).toEqual(readdirSync(source.uploads).sort())
  })

  it('refuses a database that holds data unless told to replace it', async () => {
    const refused = await command('restore', [folder], restored)
    expect(refused.code).toBe(1)
    expect(refused.stderr).toMatch(/Refused: the database holds \d+ rows .*--replace/)
    const replaced = await command('restore', [folder, '--replace'], restored)
    expect(replaced.stderr).toBe('')
    expect(replaced.code).toBe(0)
    expect(await rowCounts(restored.owner)).toEqual(await rowCounts(source.owner))
    // The uploads folder that was there is moved aside, not deleted.
    expect(readdirSync(WORK).filter(n => n.startsWith('hoopwise_backup_restored-uploads.before-restore-'))).toHaveLength(1)
  })

  it('gives a server on the restored database the demo member\'s same standing, vessels and photos', async () => {
    server = await startAppServer({ root: ROOT, port: RESTORED_PORT, env: serverEnv({ NUXT_DATABASE_URL: restored.app, NUXT_PUBLIC_URL: restored.baseUrl, NUXT_UPLOADS_DIR: restored.uploads }) })
    const after = await memberView(restored.baseUrl)
    expect(after.standing.status).toBe(200)
    expect(after.standing.body).toEqual(before.standing.body)
    expect(after.vessels.body).toEqual(before.vessels.body)
    expect(after.photos.body).toEqual(before.photos.body)
    expect(after.photos.body).toHaveLength(1)
    expect(after.bytes?.equals(before.bytes!)).toBe(true)
  })

  it('keeps the audit trail append-only for the application role', async () => {
    const client = new pg.Client({ connectionString: restored.app })
    await client.connect()
    const refused: string[] = []
    try {
      expect((await client.query('SELECT reason FROM audit_events WHERE id = $1', [auditEntryId])).rows).toEqual([{ reason: 'Kept for the backup test' }])
      for (const statement of [
        `UPDATE audit_events SET reason = 'rewritten' WHERE id = '${auditEntryId}'`,
        `DELETE FROM audit_events WHERE id = '${auditEntryId}'`,
        'TRUNCATE audit_events',
        'ALTER TABLE audit_events DISABLE TRIGGER ALL',
      ]) {
        await client.query(statement).then(() => {}, (error: { code?: string }) => refused.push(error.code ?? '?'))
      }
    }
    finally {
      await client.end()
    }
    expect(refused).toHaveLength(4)
    const [row] = await sql<{ reason: string }>('SELECT reason FROM audit_events WHERE id = $1', [auditEntryId], restored.owner)
    expect(row?.reason).toBe('Kept for the backup test')
  })

  it('erases again a member the replaced database had erased after the backup was taken', async () => {
    await server?.stop()
    server = undefined
    // The instructor was erased after the backup: the database being replaced lists them.
    const [who] = await sql<{ id: string, user_id: string, club_id: string }>(
      'SELECT m.id, m.user_id, m.club_id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1', [DEMO.instructor], restored.owner)
    await sql('INSERT INTO erasures (membership_id, user_id, club_id) VALUES ($1, $2, $3)', [who!.id, who!.user_id, who!.club_id], restored.owner)
    const run = await command('restore', [folder, '--replace'], restored)
    expect(run.stderr).toBe('')
    expect(run.code).toBe(0)
    expect(run.stdout).toMatch(/1 erased member\(s\) the backup held were erased again/)
    const [user] = await sql<{ name: string, email: string, password_hash: string | null }>('SELECT name, email, password_hash FROM users WHERE id = $1', [who!.user_id], restored.owner)
    expect(user).toEqual({ name: expect.stringMatching(/^Erased member /), email: expect.stringMatching(/@erased\.invalid$/), password_hash: null })
    expect(await sql('SELECT 1 FROM erasures WHERE membership_id = $1', [who!.id], restored.owner)).toHaveLength(1)
    // The demo member, never erased, is as the backup holds them.
    expect(await sql('SELECT 1 FROM users WHERE email = $1', [DEMO.member], restored.owner)).toHaveLength(1)
  })
})

describe('the PostgreSQL client\'s version', () => {
  it('must match the server\'s major version: the backup says so in words and writes nothing', async () => {
    const fakeBin = join(WORK, 'fake-client-bin')
    mkdirSync(fakeBin, { recursive: true })
    writeFileSync(join(fakeBin, 'pg_dump'), '#!/bin/sh\necho "pg_dump (PostgreSQL) 14.9"\n')
    chmodSync(join(fakeBin, 'pg_dump'), 0o755)
    const foldersBefore = backupFolders()
    const run = await command('backup', [], source, { HOOPWISE_PG_BIN: fakeBin })
    expect(run.code).toBe(1)
    expect(run.stderr).toContain('The database server runs PostgreSQL 15 but pg_dump 14 is the PostgreSQL client here')
    expect(backupFolders()).toEqual(foldersBefore)
  })
})

describe('keeping the last N backups', { timeout: 180_000 }, () => {
  it('deletes the oldest backups beyond HOOPWISE_BACKUP_KEEP', async () => {
    // Folders are named by the second: wait for the next one.
    await new Promise(r => setTimeout(r, 1100))
    const run = await command('backup', [], source, { HOOPWISE_BACKUP_KEEP: '1' })
    expect(run.code).toBe(0)
    const left = backupFolders()
    expect(left).toHaveLength(1)
    expect(left[0]! > folder.split('/').pop()!).toBe(true)
  })
})
