import { describe, expect, it } from 'vitest'
import { MemberEditSchema, MembershipActionSchema, RolesSchema } from '../../shared/schemas/member'
import { AuditQuerySchema } from '../../shared/schemas/audit'
import { auditActionLabel } from '../../shared/utils/audit-actions'

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
  ])('refuses %o', (input, path) => {
    const result = MemberEditSchema.safeParse(input)
    expect(result.success).toBe(false)
    expect(result.error?.issues[0]?.path).toEqual(path)
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
    expect(auditActionLabel('vessel.quarantine')).toBe('vessel.quarantine')
  })
})
