import { describe, it, expect } from 'vitest'
import { findControlChars } from '../../server/utils/validation'

describe('findControlChars (refused in every body and query)', () => {
  it.each([
    ['plain text', { name: 'Maren Tidewell' }, null],
    ['line breaks and tabs in a waiver body', { body: 'Line one\nLine two\r\n\tindented' }, null],
    ['accents and symbols', { name: 'Zillah Ébbridge — 6 bar ≈ 87 psi' }, null],
    ['a NUL in a name', { name: 'Ann\u0000' }, 'name'],
    ['an escape character deep inside', { a: { b: ['ok', 'bad\u001B'] } }, 'a.b.1'],
    ['DEL', { reason: 'x\u007F' }, 'reason'],
    ['a bare string', 'x\u0000', '_'],
    ['numbers and null', { n: 1, m: null }, null],
  ])('%s → %s', (_label, value, expected) => {
    expect(findControlChars(value)).toBe(expected)
  })
})
