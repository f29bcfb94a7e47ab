import { describe, expect, it } from 'vitest'
import { clampPage, pageCount, pageRange } from '../../shared/utils/paging'
import { countOf, matchCount } from '../../shared/utils/counts'
import { readQueryFilters, writeQueryFilters } from '../../shared/utils/query-filters'
import { OutboxQuerySchema } from '../../shared/schemas/notice'
import { MemberDirectoryQuerySchema } from '../../shared/schemas/member'
import { NOTICE_KINDS } from '../../server/services/notices/kinds'
import { attentionFor } from '../../server/services/members/standing'
import type { ClubDto, MemberDto } from '../../shared/types/dto'

describe('paging arithmetic', () => {
  it.each([
    [0, 25, 1],
    [1, 25, 1],
    [25, 25, 1],
    [26, 25, 2],
    [42, 25, 2],
    [2451, 100, 25],
  ])('%d rows at %d a page fill %d page(s)', (total, size, pages) => {
    expect(pageCount(total, size)).toBe(pages)
  })

  it.each([
    // page, total, size → clamped page
    [99, 42, 25, 2],
    [2, 42, 25, 2],
    [0, 42, 25, 1],
    [-3, 42, 25, 1],
    [5, 0, 25, 1],
    [Number.NaN, 42, 25, 1],
  ])('page %d of %d rows at %d a page is shown as page %d', (page, total, size, shown) => {
    expect(clampPage(page, total, size)).toBe(shown)
  })

  it.each([
    // The reviewer's case: page 99 of 42 rows read "2451–42 of 42".
    [99, 42, 25, { first: 26, last: 42 }],
    [1, 42, 25, { first: 1, last: 25 }],
    [2, 42, 25, { first: 26, last: 42 }],
    [1, 0, 25, { first: 0, last: 0 }],
    [3, 100, 10, { first: 21, last: 30 }],
  ])('page %d of %d rows at %d a page shows rows %j', (page, total, size, range) => {
    expect(pageRange(page, total, size)).toEqual(range)
  })
})

describe('counts in words', () => {
  it.each([
    [0, '0 members', '0 members match'],
    [1, '1 member', '1 member matches'],
    [3, '3 members', '3 members match'],
  ])('%d → "%s" / "%s"', (n, plain, filtered) => {
    expect(countOf(n, 'member')).toBe(plain)
    expect(matchCount(n, 'member')).toBe(filtered)
  })

  it('takes an irregular plural', () => {
    expect(countOf(2, 'entry', 'entries')).toBe('2 entries')
    expect(matchCount(1, 'entry', 'entries')).toBe('1 entry matches')
  })
})

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

describe('wording that must not promise more than the records allow', () => {
  it('tells a guardian what a junior may do: train first, at most the junior tier, supervised fills, no composite work', () => {
    const { text } = NOTICE_KINDS.guardian_consent.render({
      clubName: 'Saltmarsh Rocketry Guild', memberName: 'Tam Mudflat', baseUrl: 'https://rockets.example', actionUrl: 'https://rockets.example/guardian-consent?token=x',
    })
    expect(text).toMatch(/train first/)
    expect(text).toMatch(/junior tier \(T1 by default: bottle fills up to 6 bar\)/)
    expect(text).toMatch(/only under an instructor's supervision/)
    expect(text).toMatch(/composite and laminate work is for adults/)
  })

  it('says a lapsed member\'s renewal brings back training and bookings, and what else a fill needs', () => {
    const club: ClubDto = { id: 'c', name: 'Guild', timeZone: 'Europe/London', units: 'bar', graceDays: 30 }
    const member = {
      status: 'lapsed', paidThrough: '2026-01-31', approvedAt: '2025-01-01T00:00:00Z', emailVerified: true, junior: false,
      waiver: { current: true, currentVersion: 1, acceptedVersion: 1, acceptedAt: '2025-01-02T00:00:00Z' },
    } as unknown as MemberDto
    const lapsed = attentionFor(member, club, '2026-04-01').find(i => i.code === 'DUES_LAPSED')
    expect(lapsed?.message).toMatch(/Renewing lets you train and book again/)
    expect(lapsed?.message).toMatch(/a fill also needs a valid pressure tier, the current waiver, a current pressure-safety course and a vessel in service/)
    expect(lapsed?.message).not.toMatch(/train, fill and book/)
  })
})
