import { describe, it, expect } from 'vitest'
import { api } from '../support/http'

// The 503 and recovery cases (and the proof that nothing is cached) stop PostgreSQL, so they live in
// health-recovery.test.ts with a database and server of their own.
describe('GET /api/health', () => {
  it('answers 200 with the database up, uncached, without signing in', async () => {
    const res = await api('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ ok: true, db: 'up' })
    expect(res.headers.get('cache-control')).toBe('no-store')
  })
})
