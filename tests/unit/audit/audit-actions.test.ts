import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { describe, expect, it } from 'vitest'
import { ROOT } from '../../../scripts/lib/config.mjs'
import { AUDIT_ACTION_LABELS, auditActionLabel, changedFieldsOf, changedFieldsText } from '../../../shared/utils/audit-actions'

/**
 * Every audit action the server records has a readable label on the audit page. The action names
 * are read from the source: each `recordAudit(` call under server/ names its action either as a
 * string literal (`action: 'member.edit'`) or as `<something>.action`, in which case the file's
 * `action: '…'` literals (a rule table) are the names it can take.
 */
const SERVER = join(ROOT, 'server')
const LITERAL = /^'([a-z][a-z0-9_]*\.[a-z][a-z0-9_.]*)'$/
const ACTION_PROPERTY = /\baction:\s*'([a-z][a-z0-9_]*\.[a-z][a-z0-9_.]*)'/g

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    return statSync(path).isDirectory() ? sourceFiles(path) : path.endsWith('.ts') ? [path] : []
  })
}

/** The argument text of each `recordAudit(…)` call in `source` (balanced parentheses), leaving out its definition. */
function auditCalls(source: string): string[] {
  const calls: string[] = []
  for (const match of source.matchAll(/recordAudit\(/g)) {
    if (/function\s+$/.test(source.slice(0, match.index))) continue
    let depth = 0
    let end = match.index + 'recordAudit'.length
    for (; end < source.length; end++) {
      if (source[end] === '(') depth++
      else if (source[end] === ')' && --depth === 0) break
    }
    calls.push(source.slice(match.index, end + 1))
  }
  return calls
}

/** Every action name `recordAudit` is called with under server/, and the calls whose action cannot be read. */
function recordedActions(): { names: Set<string>, unreadable: string[] } {
  const names = new Set<string>()
  const unreadable: string[] = []
  for (const file of sourceFiles(SERVER)) {
    const source = readFileSync(file, 'utf8')
    for (const call of auditCalls(source)) {
      const expr = call.match(/\baction:\s*([^,\n}]+)/)?.[1]?.trim() ?? ''
      const literal = expr.match(LITERAL)?.[1]
      if (literal) names.add(literal)
      else if (/^[\w.]+\.action$/.test(expr)) {
        const table = [...source.matchAll(ACTION_PROPERTY)].map(m => m[1]!)
        if (!table.length) unreadable.push(`${relative(ROOT, file)}: ${expr}`)
        table.forEach(name => names.add(name))
      }
      else unreadable.push(`${relative(ROOT, file)}: ${expr || call.slice(0, 80)}`)
    }
  }
  return { names, unreadable }
}

describe('audit action labels', () => {
  const { names, unreadable } = recordedActions()

  it('reads the action of every recordAudit call under server/', () => {
    expect(unreadable).toEqual([])
    // The scan really finds the calls (a broken scan would pass the next test with nothing).
    expect([...names]).toEqual(expect.arrayContaining(['member.suspend', 'member.roles', 'member.edit', 'waiver.publish', 'notice.retry']))
  })

  it('has a label for every action the server records', () => {
    expect([...names].filter(name => !AUDIT_ACTION_LABELS[name]).sort()).toEqual([])
    for (const name of names) expect(auditActionLabel(name)).not.toBe(name)
  })
})

describe('changed fields in words', () => {
  it.each([
    [['phone', 'emergencyContactName'], 'Phone, Emergency contact changed'],
    [['name'], 'Name changed'],
    [['guardianEmail', 'guardianConsentAt'], 'Guardian\'s e-mail, Guardian consent changed'],
    [['somethingNew'], 'somethingNew changed'],
  ])('%o reads "%s"', (fields, text) => {
    expect(changedFieldsText(fields)).toBe(text)
  })

  it('reads the field list of an event that records which fields changed, and nothing else', () => {
    expect(changedFieldsOf({ changed: ['phone'] })).toEqual(['phone'])
    expect(changedFieldsOf({ status: 'active' })).toBeNull()
    expect(changedFieldsOf({ changed: [{ phone: '1' }] })).toBeNull()
    expect(changedFieldsOf(null)).toBeNull()
  })
})
