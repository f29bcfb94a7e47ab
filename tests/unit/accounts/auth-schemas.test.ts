import { describe, it, expect } from 'vitest'
import {
  LoginSchema, NewPasswordFormSchema, ResetPasswordSchema, ResetRequestSchema, SignupSchema, TokenSchema,
  signupSchemaFor,
} from '../../../shared/schemas/auth'
import { isJunior } from '../../../shared/utils/membership-status'

// A fixed "today" (the club's calendar date): these rules are about dates, not about the clock.
const TODAY = '2026-03-15'
const adult = { name: 'Wren Calloway', email: 'wren@example.org', password: 'long-enough-pw', birthDate: '1990-06-01' }
const junior = { ...adult, birthDate: '2012-01-20' }
const guardian = { guardianName: 'Ada Calloway', guardianEmail: 'ada@example.org' }

/** The first message per field, as the server's 400 body reports them (server/utils/errors.ts badInput). */
function fieldsOf(result: { success: boolean, error?: { issues: { path: (string | number)[], message: string }[] } }) {
  const fields: Record<string, string> = {}
  for (const issue of result.error?.issues ?? []) fields[issue.path.join('.')] ??= issue.message
  return fields
}

describe('isJunior (under 18 on the club\'s date)', () => {
  it.each([
    ['2008-03-16', true, 'turns 18 tomorrow'],
    ['2008-03-15', false, 'turns 18 today'],
    ['2008-03-14', false, 'turned 18 yesterday'],
    ['2012-01-20', true, 'fourteen'],
    ['1990-06-01', false, 'adult'],
  ])('born %s → under 18: %s (%s)', (birthDate, expected) => {
    expect(isJunior(birthDate, TODAY)).toBe(expected)
  })

  it('counts a 29 February birthday as reached on 1 March in a common year', () => {
    expect(isJunior('2008-02-29', '2026-02-28')).toBe(true)
    expect(isJunior('2008-02-29', '2026-03-01')).toBe(false)
  })

  it('does not count a member without a birth date as a junior', () => {
    expect(isJunior(null, TODAY)).toBe(false)
    expect(isJunior(undefined, TODAY)).toBe(false)
  })
})

describe('signupSchemaFor(today)', () => {
  const schema = signupSchemaFor(TODAY)

  it.each([
    ['an adult without guardian', adult, {}],
    ['an adult with empty guardian fields', { ...adult, guardianName: '', guardianEmail: '' }, {}],
    ['a junior with a guardian', { ...junior, ...guardian }, {}],
    ['someone turning 18 today, without guardian', { ...adult, birthDate: '2008-03-15' }, {}],
    ['someone turning 18 tomorrow, without guardian', { ...adult, birthDate: '2008-03-16' },
      { guardianName: 'Members under 18 name a parent or guardian', guardianEmail: 'Enter the guardian\'s e-mail: we ask them for consent' }],
    ['a junior with only a guardian name', { ...junior, guardianName: 'Ada' },
      { guardianEmail: 'Enter the guardian\'s e-mail: we ask them for consent' }],
    ['a junior naming their own e-mail as the guardian\'s', { ...junior, guardianName: 'Ada', guardianEmail: 'WREN@example.org' },
      { guardianEmail: 'Use the guardian\'s own e-mail, not yours' }],
    ['a birth date in the future', { ...adult, birthDate: '2026-03-16' }, { birthDate: 'The birth date cannot be in the future' }],
    ['a birth date before 1900', { ...adult, birthDate: '1899-12-31' }, { birthDate: 'Check the year of the birth date' }],
    ['a date that is not on the calendar', { ...adult, birthDate: '1990-02-30' }, { birthDate: 'Not a calendar date' }],
    ['a date in another form', { ...adult, birthDate: '01/06/1990' }, { birthDate: 'Use the form YYYY-MM-DD' }],
    ['a short password', { ...adult, password: 'short-pw' }, { password: 'At least 12 characters' }],
    ['a password of 201 characters', { ...adult, password: 'x'.repeat(201) }, { password: 'At most 200 characters' }],
    ['a blank name', { ...adult, name: '   ' }, { name: 'Enter your name' }],
    ['a name of 121 characters', { ...adult, name: 'n'.repeat(121) }, { name: 'At most 120 characters' }],
    ['an e-mail without a domain', { ...adult, email: 'wren@' }, { email: 'Enter a valid e-mail address' }],
    ['a guardian name of 121 characters', { ...junior, ...guardian, guardianName: 'g'.repeat(121) }, { guardianName: 'At most 120 characters' }],
  ])('%s', (_label, input, expected) => {
    expect(fieldsOf(schema.safeParse(input))).toEqual(expected)
  })

  it('normalises e-mails (trimmed, lower case) and turns empty guardian fields into null', () => {
    const parsed = schema.parse({ ...adult, email: '  Wren.Calloway@Example.ORG ', guardianName: '  ', guardianEmail: '' })
    expect(parsed.email).toBe('wren.calloway@example.org')
    expect(parsed.guardianName).toBeNull()
    expect(parsed.guardianEmail).toBeNull()
  })

  it('keeps the base SignupSchema free of date rules (the server adds them with the club\'s today)', () => {
    expect(SignupSchema.safeParse(junior).success).toBe(true)
  })

  it.each([
    ['wrong types', { ...adult, password: 12345678901 }, 'password'],
    ['missing birth date', { name: 'A', email: 'a@example.org', password: 'long-enough-pw' }, 'birthDate'],
  ])('refuses %s', (_label, input, field) => {
    expect(Object.keys(fieldsOf(schema.safeParse(input)))).toContain(field)
  })
})

describe('login, token and reset schemas', () => {
  it.each([
    [{ email: ' Member@Hoopwise.Example ', password: 'x' }, true],
    [{ email: 'member@hoopwise.example', password: '' }, false],
    [{ email: 'nope', password: 'x' }, false],
    [{ email: `${'a'.repeat(250)}@x.io`, password: 'x' }, false],
  ])('LoginSchema %j → %s', (input, ok) => {
    expect(LoginSchema.safeParse(input).success).toBe(ok)
  })

  it('lower-cases the e-mail of a sign-in and a reset request alike', () => {
    expect(LoginSchema.parse({ email: 'A@B.Example', password: 'x' }).email).toBe('a@b.example')
    expect(ResetRequestSchema.parse({ email: ' A@B.Example ' }).email).toBe('a@b.example')
  })

  it.each([
    ['a 43-character base64url token', 'q3Jd0_9-Zx'.repeat(4) + 'abc', true],
    ['too short', 'abc', false],
    ['with characters outside base64url', `${'a'.repeat(30)}/+=`, false],
    ['too long', 'a'.repeat(101), false],
  ])('TokenSchema: %s', (_label, token, ok) => {
    expect(TokenSchema.safeParse({ token }).success).toBe(ok)
  })

  it('ResetPasswordSchema needs a well-formed token and a long enough password', () => {
    const token = 'a'.repeat(43)
    expect(ResetPasswordSchema.safeParse({ token, password: 'long-enough-pw' }).success).toBe(true)
    expect(fieldsOf(ResetPasswordSchema.safeParse({ token, password: 'short' }))).toEqual({ password: 'At least 12 characters' })
  })

  it('NewPasswordFormSchema wants the password twice, the same', () => {
    expect(NewPasswordFormSchema.safeParse({ password: 'long-enough-pw', confirm: 'long-enough-pw' }).success).toBe(true)
    expect(fieldsOf(NewPasswordFormSchema.safeParse({ password: 'long-enough-pw', confirm: 'long-enough-px' })))
      .toEqual({ confirm: 'The two passwords differ' })
  })
})
