import { describe, expect, it } from 'vitest'
import {
  futureBirthDateIssue, juniorGuardianIssues, MemberEditSchema, memberEditFormSchemaFor, MembershipActionSchema, RolesSchema,
} from '../../../shared/schemas/member'
import { AuditQuerySchema } from '../../../shared/schemas/audit'
import { auditActionLabel } from '../../../shared/utils/audit-actions'

describe('MemberEditSchema', () => {
  it('turns cleared fields into null, a cleared birth date included', () => {
    expect(MemberEditSchema.parse({ phone: '', birthDate: '', guardianEmail: '', guardianName: ' ' }))
      .toEqual({ phone: null, birthDate: null, guardianEmail: null, guardianName: null })
  })

  it('keeps only what was sent and lower-cases the guardian e-mail', () => {
    expect(MemberEditSchema.parse({ guardianEmail: 'Parent@Example.org' })).toEqual({ guardianEmail: 'parent@example.org' })
  })

  it.each([
    [{}, []],
    [{ birthDate: '2021-02-29' }, ['birthDate']],
    [{ phone: 'ring me' }, ['phone']],
    [{ unitPreference: 'kPa' }, ['unitPreference']],
    [{ name: '' }, ['name']],
    [{ birthDate: '0000-01-01' }, ['birthDate']],
    [{ birthDate: '1899-12-31' }, ['birthDate']],
    [{ reason: 'Corrected the phone number' }, []],
    [{ phone: '+44 1632 960000', reason: 'ab' }, ['reason']],
  ])('refuses %o', (input, path) => {
    const result = MemberEditSchema.safeParse(input)
    expect(result.success).toBe(false)
    expect(result.error?.issues[0]?.path).toEqual(path)
  })

  it('takes an optional reason for the audit trail; a blank one is none', () => {
    expect(MemberEditSchema.parse({ phone: '', reason: '  Typo in the number ' })).toEqual({ phone: null, reason: 'Typo in the number' })
    expect(MemberEditSchema.parse({ phone: '', reason: '  ' })).toEqual({ phone: null, reason: undefined })
    expect(MemberEditSchema.parse({ birthDate: '1900-01-01' })).toEqual({ birthDate: '1900-01-01' })
  })
})

describe('the junior rule and the birth date on an admin edit', () => {
  const today = '2025-06-15'

  it.each([
    ['an adult without a guardian', { birthDate: '2007-06-15' }, undefined, []],
    ['no birth date', { birthDate: null }, undefined, []],
    ['a junior without a guardian', { birthDate: '2007-06-16' }, undefined, ['guardianName', 'guardianEmail']],
    ['a junior with a name only', { birthDate: '2015-01-01', guardianName: 'Rowan Tidewater' }, undefined, ['guardianEmail']],
    ['a junior with a full guardian', { birthDate: '2015-01-01', guardianName: 'Rowan Tidewater', guardianEmail: 'rowan@family.example' }, undefined, []],
    ['a junior whose guardian e-mail is their own', { birthDate: '2015-01-01', guardianName: 'Rowan', guardianEmail: 'Pip@family.example' }, 'pip@family.example', ['guardianEmail']],
  ])('%s', (_label, values, email, paths) => {
    expect(juniorGuardianIssues(values, today, email).map(i => i.path)).toEqual(paths)
  })

  it('refuses a birth date after today, not today itself', () => {
    expect(futureBirthDateIssue('2025-06-16', today)?.path).toBe('birthDate')
    expect(futureBirthDateIssue('2025-06-15', today)).toBeNull()
    expect(futureBirthDateIssue(null, today)).toBeNull()
  })

  it('the form applies both rules to what it holds', () => {
    const form = memberEditFormSchemaFor(today)
    const junior = { name: 'Pip Tidewater', unitPreference: 'bar', birthDate: '2015-01-01', guardianName: '', guardianEmail: '' }
    expect(form.safeParse(junior).error?.issues.map(i => i.path)).toEqual([['guardianName'], ['guardianEmail']])
    expect(form.safeParse({ ...junior, birthDate: '2030-01-01' }).error?.issues.map(i => i.message)).toEqual(['The birth date cannot be in the future'])
    expect(form.safeParse({ ...junior, guardianName: 'Rowan', guardianEmail: 'rowan@family.example' }).success).toBe(true)
  })
})

describe('reasons and roles', () => {
  it.each(['', '  ', 'ok', 'x'.repeat(501)])('a membership action refuses the reason %j', (reason) => {
    expect(MembershipActionSchema.safeParse({ reason }).success).toBe(false)
  })

  it('trims a good reason', () => {
    expect(MembershipActionSchema.parse({ reason: '  Left the pad during a fill  ' })).toEqual({ reason: 'Left the pad during a fill' })
  })

  it('takes known roles only, with a reason', () => {
    expect(RolesSchema.parse({ roles: ['instructor', 'admin'], reason: 'Committee vote' })).toEqual({ roles: ['instructor', 'admin'], reason: 'Committee vote' })
    expect(RolesSchema.safeParse({ roles: ['captain'], reason: 'Committee vote' }).success).toBe(false)
    expect(RolesSchema.safeParse({ roles: ['admin'] }).success).toBe(false)
  })
})

describe('AuditQuerySchema', () => {
  it('treats blank filters as none', () => {
    expect(AuditQuerySchema.parse({ action: '', subjectId: '' })).toEqual({ page: 1, pageSize: 25 })
  })

  it.each([
    [{ action: 'DROP TABLE' }, 'action'],
    [{ action: 'member.suspend;' }, 'action'],
    [{ subjectId: '42' }, 'subjectId'],
  ])('refuses %o', (input, field) => {
    expect(AuditQuerySchema.safeParse(input).error?.issues[0]?.path).toEqual([field])
  })

  it('labels known actions and shows unknown ones as their code', () => {
    expect(auditActionLabel('member.suspend')).toBe('Suspended a membership')
    expect(auditActionLabel('vessel.scrap')).toBe('vessel.scrap')
  })
})
