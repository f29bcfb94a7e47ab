import { describe, expect, it } from 'vitest'
import { MEMBERSHIP_STATUSES, MEMBERSHIP_STATUS_LABELS, MEMBERSHIP_STATUS_WORDS } from '../../shared/utils/membership-status'
import { NOTICE_STATUSES, NOTICE_STATUS_WORDS } from '../../shared/utils/notice-status'
import { AUDIT_ACTIONS, AUDIT_ACTION_WORDS } from '../../shared/utils/audit-actions'
import { FIELD_LABELS } from '../../shared/utils/field-labels'
import { MemberDirectoryQuerySchema } from '../../shared/schemas/member'
import { OutboxQuerySchema } from '../../shared/schemas/notice'
import type { Words } from '../../shared/utils/words'

/**
 * A label is a short phrase starting with a capital, never a code (no dots or underscores); a meaning
 * is one sentence ending with a full stop.
 */
function expectWords(words: Words | undefined, code: string) {
  expect(words, code).toBeDefined()
  expect(words!.label).toMatch(/^[A-Z][^._]{1,40}$/)
  expect(words!.meaning).toMatch(/^[A-Z].{10,}\.$/)
  expect(words!.meaning.split(/\.\s+[A-Z]/)).toHaveLength(1)
}

describe.each([
  ['membership statuses', MEMBERSHIP_STATUSES, MEMBERSHIP_STATUS_WORDS],
  ['notice statuses', NOTICE_STATUSES, NOTICE_STATUS_WORDS],
  ['audit actions', AUDIT_ACTIONS, AUDIT_ACTION_WORDS],
] as [string, readonly string[], Record<string, Words>][])('%s', (_name, codes, words) => {
  it.each(codes.map(c => [c]))('%s has a label and a one-sentence meaning', (code) => {
    expectWords(words[code], code)
  })

  it('has words for exactly the listed codes, each label its own', () => {
    expect(Object.keys(words).sort()).toEqual([...codes].sort())
    const labels = codes.map(c => words[c]!.label)
    expect(new Set(labels).size).toBe(labels.length)
  })
})

describe('the lists are the servers\' enum values', () => {
  it.each(MEMBERSHIP_STATUSES.map(s => [s]))('the member directory filters by %s', (status) => {
    expect(MemberDirectoryQuerySchema.safeParse({ status }).success).toBe(true)
  })
  it.each(NOTICE_STATUSES.map(s => [s]))('the outbox filters by %s', (status) => {
    expect(OutboxQuerySchema.safeParse({ status }).success).toBe(true)
  })
  it.each([
    [MemberDirectoryQuerySchema, 'in grace'],
    [MemberDirectoryQuerySchema, 'Grace period'],
    [OutboxQuerySchema, 'bounced'],
  ])('refuses a status outside the list', (schema, status) => {
    expect(schema.safeParse({ status }).success).toBe(false)
  })

  it('labels each membership status once, from its words', () => {
    expect(MEMBERSHIP_STATUS_LABELS).toEqual(Object.fromEntries(MEMBERSHIP_STATUSES.map(s => [s, MEMBERSHIP_STATUS_WORDS[s].label])))
    expect(MEMBERSHIP_STATUS_WORDS.grace.label).toBe('Grace period')
  })
})

describe('field labels', () => {
  it('are unique, so two fields never read the same', () => {
    const labels = Object.values(FIELD_LABELS)
    expect(labels.filter((l, i) => labels.indexOf(l) !== i)).toEqual([])
  })
})
