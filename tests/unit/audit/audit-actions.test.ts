import { describe, expect, expectTypeOf, it } from 'vitest'
import type { AuditEntry } from '../../../server/services/audit'
import {
  AUDIT_ACTIONS, AUDIT_ACTION_WORDS, auditActionLabel, auditSubjectLabel, auditValueText, changedFieldsOf, changedFieldsText,
  isAuditAction, type AuditAction,
} from '../../../shared/utils/audit-actions'
import { AuditQuerySchema } from '../../../shared/schemas/audit'
import { formatInstant } from '../../../shared/utils/dates'

/**
 * The audit actions are one list with a union type: `recordAudit` takes that type, so the compiler
 * (the typecheck stage) refuses an action outside the list, and each action in the list has its words.
 */
describe('audit actions', () => {
  it('recordAudit takes exactly the listed actions (checked by the typecheck stage)', () => {
    expectTypeOf<AuditEntry['action']>().toEqualTypeOf<AuditAction>()
    // @ts-expect-error an action outside the list does not compile
    const unlisted: AuditEntry['action'] = 'member.delete'
    expect(isAuditAction(unlisted)).toBe(false)
  })

  it.each(AUDIT_ACTIONS)('%s has a label and a one-sentence meaning, and the filter accepts it', (action) => {
    const words = AUDIT_ACTION_WORDS[action]
    expect(words.label).toMatch(/^[A-Z]\S*( \S+)*$/)
    expect(words.label).not.toContain(action)
    expect(words.meaning).toMatch(/^[A-Z][^.]*(\.[^.]+)*\.$/)
    expect(auditActionLabel(action)).toBe(words.label)
    expect(AuditQuerySchema.safeParse({ action }).success).toBe(true)
  })

  it('gives every action its own label', () => {
    const labels = AUDIT_ACTIONS.map(a => AUDIT_ACTION_WORDS[a].label)
    expect(new Set(labels).size).toBe(AUDIT_ACTIONS.length)
    expect(Object.keys(AUDIT_ACTION_WORDS).sort()).toEqual([...AUDIT_ACTIONS].sort())
  })

  it.each(['member.delete', 'test.append_only', 'Member.suspend', 'member.suspend;'])('the filter refuses %s', (action) => {
    expect(isAuditAction(action)).toBe(false)
    expect(AuditQuerySchema.safeParse({ action }).success).toBe(false)
  })

  it('shows an action no longer listed by its stored text rather than nothing', () => {
    expect(auditActionLabel('test.append_only')).toBe('test.append_only')
  })

  it.each([
    ['membership', 'A member'],
    ['waiver', 'A waiver version'],
    ['notice', 'An e-mail in the outbox'],
    ['club', 'The club'],
    ['user', 'An account'],
  ])('says what a %s subject is in words', (type, words) => {
    expect(auditSubjectLabel(type)).toBe(words)
  })
})

describe('changed fields in words', () => {
  it.each([
    [['phone', 'emergencyContactName'], 'Phone, Emergency contact changed'],
    [['name'], 'Name changed'],
    [['guardianEmail', 'guardianConsentAt'], 'Guardian\'s e-mail, Guardian consent changed'],
    [['paidThrough'], 'Dues paid through changed'],
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

describe('before and after values in words', () => {
  const member = { subjectType: 'membership', timeZone: 'Europe/London' }
  it.each([
    ['status', 'grace', member, 'Grace period'],
    ['status', 'suspended', member, 'Suspended'],
    ['status', 'failed', { subjectType: 'notice', timeZone: null }, 'Failed'],
    ['status', 'queued', { subjectType: 'notice', timeZone: null }, 'Queued'],
    ['roles', ['member', 'safety_officer'], member, 'Member, Safety officer'],
    ['junior', true, member, 'Yes'],
    ['junior', false, member, 'No'],
    ['guardianConsentAt', null, member, '—'],
    ['paidThrough', '2026-03-01', member, '1 March 2026'],
    ['outcome', 'done', { subjectType: 'club', timeZone: null }, 'Finished'],
    ['attempts', 3, { subjectType: 'notice', timeZone: null }, '3'],
  ])('%s = %o reads "%s"', (field, value, opts, text) => {
    expect(auditValueText(field, value, opts)).toBe(text)
  })

  // 23:30 UTC on 15 January is already 16 January in Auckland (UTC+13 in summer, IANA tz database).
  it('writes an instant in the club\'s time zone and format, and says UTC while the zone is unknown', () => {
    const at = '2026-01-15T23:30:00.000Z'
    const auckland = auditValueText('suspendedAt', at, { subjectType: 'membership', timeZone: 'Pacific/Auckland' })
    expect(auckland).toBe(formatInstant(at, 'Pacific/Auckland'))
    expect(auckland).toContain('16 Jan 2026')
    expect(auckland).toContain('12:30')
    expect(auditValueText('suspendedAt', at, { subjectType: 'membership', timeZone: null })).toBe('15 Jan 2026, 23:30 UTC')
  })
})
