import { describe, it, expect } from 'vitest'
import { clubBaseUrl, clubToday } from '../../../server/services/clubs/clubs'

describe('club helpers', () => {
  it.each([
    ['https://rockets.saltmarsh.example', 'https://rockets.saltmarsh.example'],
    ['https://rockets.saltmarsh.example/', 'https://rockets.saltmarsh.example'],
    ['https://rockets.saltmarsh.example/club//', 'https://rockets.saltmarsh.example/club'],
  ])('clubBaseUrl(%s) → %s', (publicUrl, expected) => {
    expect(clubBaseUrl({ publicUrl })).toBe(expected)
  })

  it('takes today in the club\'s time zone, not the server\'s', () => {
    // 23:30 UTC on 14 March is already 15 March in Auckland (UTC+13) and still 14 March in London.
    const instant = new Date('2026-03-14T23:30:00Z')
    expect(clubToday({ timeZone: 'Pacific/Auckland' }, instant)).toBe('2026-03-15')
    expect(clubToday({ timeZone: 'Europe/London' }, instant)).toBe('2026-03-14')
  })
})
