import { describe, expect, it } from 'vitest'
import { countOf, matchCount } from '../../shared/utils/counts'

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
