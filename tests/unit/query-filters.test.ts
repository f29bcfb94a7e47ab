import { describe, expect, it } from 'vitest'
import { readQueryFilters, writeQueryFilters } from '../../shared/utils/query-filters'
import { OutboxQuerySchema } from '../../shared/schemas/notice'
import { MemberDirectoryQuerySchema } from '../../shared/schemas/member'

describe('list filters in the URL query', () => {
  it('reads the outbox view from the dashboard\'s link, defaults for the rest', () => {
    expect(readQueryFilters(OutboxQuerySchema, { status: 'failed' })).toEqual({ page: 1, pageSize: 25, status: 'failed' })
  })

  it('lets one bad or repeated value fall back to its default alone', () => {
    expect(readQueryFilters(OutboxQuerySchema, { status: 'lost', kind: 'dues_reminder', page: '3', pageSize: ['10', '50'] }))
      .toEqual({ page: 3, pageSize: 25, kind: 'dues_reminder' })
    expect(readQueryFilters(MemberDirectoryQuerySchema, { sort: 'shoe-size', dir: 'desc', page: '0' }))
      .toMatchObject({ sort: 'name', dir: 'desc', page: 1 })
  })

  it('writes a short query: defaults and empty values left out', () => {
    expect(writeQueryFilters(OutboxQuerySchema, { page: 1, pageSize: 25, status: 'failed', kind: '' })).toEqual({ status: 'failed' })
    expect(writeQueryFilters(OutboxQuerySchema, { page: 2, pageSize: 50 })).toEqual({ page: '2', pageSize: '50' })
    expect(writeQueryFilters(MemberDirectoryQuerySchema, { page: 1, pageSize: 25, sort: 'name', dir: 'asc', q: 'tide' })).toEqual({ q: 'tide' })
  })

  it('round-trips a view through the URL', () => {
    const view = { page: 4, pageSize: 10, status: 'queued' as const, kind: 'dues_reminder' }
    expect(readQueryFilters(OutboxQuerySchema, writeQueryFilters(OutboxQuerySchema, view))).toEqual(view)
  })
})
