import { describe, it, expect } from 'vitest'
import { findControlChars, scanBody, MAX_BODY_DEPTH } from '../../server/utils/validation'

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

describe('scanBody (the shape every body must have)', () => {
  const nested = (depth: number): unknown => {
    let v: unknown = 'leaf'
    for (let i = 0; i < depth; i++) v = [v]
    return v
  }

  it('accepts the nesting our schemas use', () => {
    expect(scanBody({ roles: ['member'], reason: 'ok' })).toEqual({ tooDeep: false, controlAt: null })
  })

  it.each([[MAX_BODY_DEPTH, false], [MAX_BODY_DEPTH + 1, true]])('at depth %d, too deep: %s', (depth, tooDeep) => {
    expect(scanBody(nested(depth)).tooDeep).toBe(tooDeep)
  })

  it('walks a hostile 100 000-deep body without exhausting the stack', () => {
    expect(findControlChars(nested(100_000))).toBeNull()
    expect(scanBody(nested(100_000)).tooDeep).toBe(true)
  })
})
