import { describe, expect, it } from 'vitest'
import type { ZodTypeAny } from 'zod'
import { MemberDirectoryQuerySchema, ProfileSchema } from '../../../shared/schemas/member'
import { WaiverAcceptFormSchema, WaiverAcceptSchema, WaiverPublishSchema } from '../../../shared/schemas/waiver'

/** The first error's path and message, or null when the value is accepted. */
function refusal(schema: ZodTypeAny, value: unknown): { path: string, message: string } | null {
  const result = schema.safeParse(value)
  if (result.success) return null
  const issue = result.error.issues[0]!
  return { path: issue.path.join('.'), message: issue.message }
}

const profile = { name: 'Maren Tidewell', phone: '+44 1632 960123', emergencyContactName: 'Jory Tidewell', emergencyContactPhone: '(01632) 960-456', unitPreference: 'bar' }

describe('ProfileSchema', () => {
  it('accepts a full profile and trims the name', () => {
    expect(ProfileSchema.parse({ ...profile, name: '  Maren Tidewell ' })).toEqual({ ...profile, name: 'Maren Tidewell' })
  })

  it.each([
    ['empty optional fields become null', { ...profile, phone: '', emergencyContactName: '  ', emergencyContactPhone: '' }, { phone: null, emergencyContactName: null, emergencyContactPhone: null }],
    ['optional fields may be left out', { name: 'Maren', unitPreference: 'psi' }, { name: 'Maren', unitPreference: 'psi' }],
    ['null clears an optional field', { ...profile, phone: null }, { phone: null }],
  ])('%s', (_label, value, expected) => {
    expect(ProfileSchema.parse(value)).toMatchObject(expected)
  })

  it.each([
    ['an empty name', { ...profile, name: '   ' }, 'name', 'Enter your name'],
    ['a name over 120 characters', { ...profile, name: 'x'.repeat(121) }, 'name', 'At most 120 characters'],
    ['a missing name', { unitPreference: 'bar' }, 'name', 'Required'],
    ['letters in the phone number', { ...profile, phone: '01632 CALL ME' }, 'phone', 'Digits, spaces, +, -, ( and ) only'],
    ['a phone number over 40 characters', { ...profile, phone: '1'.repeat(41) }, 'phone', 'At most 40 characters'],
    ['an emergency contact name over 120 characters', { ...profile, emergencyContactName: 'y'.repeat(121) }, 'emergencyContactName', 'At most 120 characters'],
    ['a unit other than bar or psi', { ...profile, unitPreference: 'kPa' }, 'unitPreference', undefined],
    ['no unit preference', { name: 'Maren' }, 'unitPreference', 'Required'],
    ['a number for the name', { ...profile, name: 42 }, 'name', undefined],
  ])('refuses %s', (_label, value, path, message) => {
    const r = refusal(ProfileSchema, value)
    expect(r?.path).toBe(path)
    if (message) expect(r?.message).toBe(message)
  })
})

describe('WaiverAcceptSchema', () => {
  it.each([
    [{ version: 1, typedName: 'Maren Tidewell' }],
    [{ version: 7, typedName: '  maren tidewell  ' }],
  ])('accepts %j', (value) => {
    expect(refusal(WaiverAcceptSchema, value)).toBeNull()
  })

  it('trims the typed name', () => {
    expect(WaiverAcceptSchema.parse({ version: 2, typedName: '  Maren  ' }).typedName).toBe('Maren')
  })

  it.each([
    ['version 0', { version: 0, typedName: 'Maren' }, 'version'],
    ['a fractional version', { version: 1.5, typedName: 'Maren' }, 'version'],
    ['the version as a string', { version: '1', typedName: 'Maren' }, 'version'],
    ['a missing version', { typedName: 'Maren' }, 'version'],
    ['a blank typed name', { version: 1, typedName: '   ' }, 'typedName'],
    ['a typed name over 120 characters', { version: 1, typedName: 'z'.repeat(121) }, 'typedName'],
    ['a missing typed name', { version: 1 }, 'typedName'],
  ])('refuses %s', (_label, value, path) => {
    expect(refusal(WaiverAcceptSchema, value)?.path).toBe(path)
  })
})

describe('WaiverAcceptFormSchema (the accept form)', () => {
  it('accepts a typed name with the box ticked', () => {
    expect(refusal(WaiverAcceptFormSchema, { typedName: 'Maren', read: true })).toBeNull()
  })

  it.each([
    ['the box unticked', { typedName: 'Maren', read: false }],
    ['the box never touched', { typedName: 'Maren' }],
  ])('refuses %s, saying why', (_label, value) => {
    expect(refusal(WaiverAcceptFormSchema, value)).toEqual({ path: 'read', message: 'Tick the box once you have read the waiver' })
  })
})

describe('WaiverPublishSchema', () => {
  const body = 'I will proof-test vessels full of water and from a distance.'

  it('accepts a title and a text, trimmed', () => {
    expect(WaiverPublishSchema.parse({ title: ' Risk waiver ', body: `\n${body}\n` })).toEqual({ title: 'Risk waiver', body })
  })

  it.each([
    ['an empty title', { title: ' ', body }, 'title', 'Enter a title'],
    ['a title over 200 characters', { title: 't'.repeat(201), body }, 'title', 'At most 200 characters'],
    ['a text under 20 characters', { title: 'Waiver', body: 'Too short.' }, 'body', 'The waiver text needs at least 20 characters'],
    ['a text over 20 000 characters', { title: 'Waiver', body: 'b'.repeat(20_001) }, 'body', 'At most 20 000 characters'],
    ['a missing text', { title: 'Waiver' }, 'body', 'Required'],
  ])('refuses %s', (_label, value, path, message) => {
    expect(refusal(WaiverPublishSchema, value)).toEqual({ path, message })
  })
})

describe('MemberDirectoryQuerySchema', () => {
  it('fills in the defaults for an empty query', () => {
    expect(MemberDirectoryQuerySchema.parse({})).toEqual({ page: 1, pageSize: 25, sort: 'name', dir: 'asc' })
  })

  it.each([
    ['strings from the query string are coerced', { page: '3', pageSize: '50' }, { page: 3, pageSize: 50 }],
    ['a status filter', { status: 'grace' }, { status: 'grace' }],
    ['a role filter', { role: 'safety_officer' }, { role: 'safety_officer' }],
    ['a trimmed search', { q: '  tide ' }, { q: 'tide' }],
    ['sorting by paid-through, newest first', { sort: 'paidThrough', dir: 'desc' }, { sort: 'paidThrough', dir: 'desc' }],
  ])('accepts %s', (_label, value, expected) => {
    expect(MemberDirectoryQuerySchema.parse(value)).toMatchObject(expected)
  })

  it.each([
    ['page 0', { page: '0' }, 'page'],
    ['a page that is not a number', { page: 'two' }, 'page'],
    ['a page size over 100', { pageSize: '101' }, 'pageSize'],
    ['an unknown status', { status: 'expired' }, 'status'],
    ['an unknown role', { role: 'treasurer' }, 'role'],
    ['an unknown sort field', { sort: 'password_hash' }, 'sort'],
    ['an unknown direction', { dir: 'sideways' }, 'dir'],
    ['a search over 100 characters', { q: 'q'.repeat(101) }, 'q'],
  ])('refuses %s', (_label, value, path) => {
    expect(refusal(MemberDirectoryQuerySchema, value)?.path).toBe(path)
  })
})
