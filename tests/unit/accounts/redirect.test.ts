import { describe, it, expect } from 'vitest'
import { safeNextPath } from '../../../shared/utils/redirect'

describe('safeNextPath (where sign-in goes next)', () => {
  it.each([
    ['/members', '/members'],
    ['/members/abc?tab=roles#top', '/members/abc?tab=roles#top'],
    ['/', '/'],
    ['/verify-email', '/verify-email'],
  ])('keeps the in-site path %s', (next, expected) => {
    expect(safeNextPath(next)).toBe(expected)
  })

  it.each([
    ['//evil.example', 'protocol-relative address'],
    ['//evil.example/members', 'protocol-relative address with a path'],
    ['/\\evil.example', 'backslash that browsers read as a slash'],
    ['https://evil.example/', 'absolute address'],
    ['javascript:alert(1)', 'script address'],
    ['members', 'relative path'],
    ['', 'empty'],
  ])('sends %s (%s) to /', (next) => {
    expect(safeNextPath(next)).toBe('/')
  })

  it('ignores a repeated or missing query parameter', () => {
    expect(safeNextPath(['/members', '/audit'])).toBe('/')
    expect(safeNextPath(undefined)).toBe('/')
    expect(safeNextPath(null)).toBe('/')
  })
})
