import { join } from 'node:path'
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startPostgres, stopPostgres } from '../../scripts/lib/postgres.mjs'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT, LOCAL, TEST } from '../../scripts/lib/config.mjs'
import { prepareDatabase } from '../../scripts/lib/database.mjs'
import { api } from '../support/http'
import { serverEnv } from '../support/test-env'

// This file stops PostgreSQL, so it runs a cluster and a server of its own: the shared ones never notice.
const pgDir = join(LOCAL, 'test', 'pg-health')
const pgPort = TEST.spareBase + 18
const appPort = TEST.spareBase + 19
const baseUrl = `http://127.0.0.1:${appPort}`
let server: Awaited<ReturnType<typeof startAppServer>> | undefined

async function waitForHealth(status: number, timeoutMs = 20_000) {
  const deadline = Date.now() + timeoutMs
  let last = 0
  while (Date.now() < deadline) {
    last = (await api('/api/health', { baseUrl })).status
    if (last === status) return
    await new Promise(r => setTimeout(r, 250))
  }
  throw new Error(`health stayed ${last}, expected ${status}`)
}

describe('GET /api/health when PostgreSQL goes away and comes back', () => {
  beforeAll(async () => {
    const pg = startPostgres({ dir: pgDir, port: pgPort, database: 'hoopwise_health', fast: true })
    await prepareDatabase({ databaseUrl: pg.url, publicUrl: baseUrl, seed: false, log: () => {} })
    server = await startAppServer({ root: ROOT, port: appPort, env: serverEnv({ NUXT_DATABASE_URL: pg.url, NUXT_PUBLIC_URL: baseUrl }) })
  })

  afterAll(async () => {
    await server?.stop()
    stopPostgres(pgDir)
  })

  it('answers 200 { ok: true, db: "up" } while the database is up', async () => {
    const res = await api('/api/health', { baseUrl })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ ok: true, db: 'up' })
  })

  it('answers 503 { ok: false, db: "down" } once it stops (nothing cached), without the server dying', async () => {
    stopPostgres(pgDir)
    const started = Date.now()
    const res = await api('/api/health', { baseUrl })
    expect(res.status).toBe(503)
    expect(res.body).toEqual({ ok: false, db: 'down' })
    // The driver's connect timeout bounds the answer: no request hangs on a dead database.
    expect(Date.now() - started).toBeLessThan(10_000)
    expect(server?.exitCode).toBeNull()
  })

  it('recovers by itself when the database comes back', async () => {
    startPostgres({ dir: pgDir, port: pgPort, database: 'hoopwise_health', fast: true })
    await waitForHealth(200)
    const res = await api('/api/health', { baseUrl })
    expect(res.body).toEqual({ ok: true, db: 'up' })
  })
})
