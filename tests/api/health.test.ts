import { describe, it, expect } from 'vitest'
import { api } from '../support/http'

describe('GET /api/health', () => {
  it('answers 200 with the database up, uncached', async () => {
    const res = await api('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ ok: true, db: 'up' })
    expect(res.headers.get('cache-control')).toBe('no-store')
  })
})
