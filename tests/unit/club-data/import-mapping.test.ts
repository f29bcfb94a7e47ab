import { describe, it, expect } from 'vitest'
import { readDateCell, readRolesCell, readTierCell, suggestMapping, mappedCells } from '../../../shared/utils/import-fields'
import { checkImportRow, ImportMappingSchema, issuesText } from '../../../shared/schemas/club-data'

describe('reading a date cell', () => {
  it.each([
    ['2024-03-05', 'auto', '2024-03-05'],
    ['2024/3/5', 'dmy', '2024-03-05'], // year first reads the same in every format
    ['25/03/2024', 'auto', '2024-03-25'], // 25 cannot be a month
    ['03/25/2024', 'auto', '2024-03-25'],
    ['05.05.2024', 'auto', '2024-05-05'], // both readings agree
    ['05/03/2024', 'dmy', '2024-03-05'],
    ['05/03/2024', 'mdy', '2024-05-03'],
    ['5-3-2024', 'dmy', '2024-03-05'],
    ['', 'auto', null],
  ] as const)('%s as %s → %s', (cell, format, date) => {
    expect(readDateCell(cell, format)).toEqual({ date })
  })

  it.each([
    ['05/03/2024', 'auto', /Ambiguous/],
    ['05/03/24', 'dmy', /four digits/],
    ['31/02/2024', 'dmy', /calendar/],
    ['2023-02-29', 'auto', /calendar/],
    ['25/03/2024', 'ymd', /year first/],
    ['March 5th', 'dmy', /Not a date/],
    ['45000', 'dmy', /Not a date/], // a spreadsheet's day number is not read as a date
  ] as const)('%s as %s is refused', (cell, format, reason) => {
    const read = readDateCell(cell, format)
    expect('error' in read && read.error).toMatch(reason)
  })
})

describe('reading roles and tiers', () => {
  it.each([
    ['Instructor; safety officer', ['instructor', 'safety_officer']],
    ['admin,member', ['member', 'admin']],
    ['SAFETY_OFFICER', ['safety_officer']],
    ['', []],
  ])('%s → %j', (cell, roles) => {
    expect(readRolesCell(cell)).toEqual({ roles })
  })

  it('refuses a word that is no role', () => {
    expect(readRolesCell('captain')).toEqual({ error: expect.stringContaining('"captain" is not a role') })
  })

  it.each([['T2', 2], ['0', 0], ['t4', 4], ['', null]])('tier %s → %s', (cell, rank) => {
    expect(readTierCell(cell)).toEqual({ rank })
  })

  it('refuses a tier outside T0–T4', () => {
    expect(readTierCell('T5')).toHaveProperty('error')
  })
})

describe('the mapping', () => {
  it('guesses fields from the usual headings, each column once', () => {
    expect(suggestMapping(['Full name', 'E-mail address', 'Mobile', 'Date of birth', 'Paid until', 'Notes', 'Name'])).toEqual({
      name: 0, email: 1, phone: 2, birthDate: 3, paidThrough: 4,
    })
  })

  it('reads the mapped cells, trimmed, a missing cell as empty', () => {
    expect(mappedCells([' Ann Lee ', 'ann@example.org'], { name: 0, email: 1, phone: 5, plan: null })).toEqual({ name: 'Ann Lee', email: 'ann@example.org', phone: '' })
  })

  it('needs a name and an e-mail column, and each column once', () => {
    const parsed = ImportMappingSchema.safeParse({ columns: { name: 0, phone: 0 }, dateFormat: 'auto' })
    expect(parsed.success).toBe(false)
    const paths = parsed.error!.issues.map(i => i.path.join('.'))
    expect(paths).toEqual(expect.arrayContaining(['columns.email', 'columns.phone']))
  })
})

describe('checking a row with the forms\' schemas', () => {
  const columns = {
    name: 0, email: 1, phone: 2, birthDate: 3, paidThrough: 4, roles: 5, guardianName: 6, guardianEmail: 7,
    trainingCourse: 8, trainedOn: 9, trainingAssessor: 10, tierRank: 11, tierSignedOn: 12, tierAssessor: 13,
  }
  const today = '2026-06-01'
  const cells = (over: Record<number, string>) => {
    const base = ['Ann Lee', 'Ann@Example.org', '+44 20 7946 0000', '14/02/1990', '2026-12-31', 'Instructor', '', '', '', '', '', '', '', '']
    for (const [i, v] of Object.entries(over)) base[Number(i)] = v
    return base
  }

  it('reads a good row into the form values', () => {
    const checked = checkImportRow(cells({ 8: 'First aid', 9: '01/03/2025', 10: 'Dee Fox', 11: 'T1', 12: '02/03/2025', 13: 'Dee Fox' }), columns, 'dmy', today)
    expect(checked).toEqual({
      row: expect.objectContaining({
        name: 'Ann Lee', email: 'ann@example.org', phone: '+44 20 7946 0000', birthDate: '1990-02-14', paidThrough: '2026-12-31', roles: ['instructor'],
        training: { course: 'First aid', trainedOn: '2025-03-01', assessorName: 'Dee Fox' },
        tier: { rank: 1, signedOn: '2025-03-02', assessorName: 'Dee Fox' },
      }),
    })
  })

  it.each([
    [{ 1: 'not-an-address' }, 'email', /valid e-mail/],
    [{ 0: '' }, 'name', /name/],
    [{ 2: 'call me' }, 'phone', /Digits/],
    [{ 3: '14/02/2030' }, 'birthDate', /future/],
    [{ 3: '14/02/2015' }, 'guardianName', /under 18/], // a junior names a guardian, as on the sign-up form
    [{ 3: '14/02/2015', 6: 'Bo Lee', 7: 'ann@example.org' }, 'guardianEmail', /guardian's own/],
    [{ 5: 'captain' }, 'roles', /not a role/],
    [{ 8: 'First aid' }, 'trainedOn', /together/],
  ])('refuses %j on %s', (over, field, reason) => {
    const checked = checkImportRow(cells(over), columns, 'dmy', today)
    expect('issues' in checked).toBe(true)
    const issue = (checked as { issues: { field: string, reason: string }[] }).issues.find(i => i.field === field)
    expect(issue?.reason).toMatch(reason)
  })

  it('refuses an ambiguous date unless the format is chosen', () => {
    const ambiguous = cells({ 3: '04/02/1990' })
    expect(checkImportRow(ambiguous, columns, 'auto', today)).toEqual({ issues: [{ field: 'birthDate', reason: expect.stringMatching(/Ambiguous/) }] })
    expect(checkImportRow(ambiguous, columns, 'mdy', today)).toEqual({ row: expect.objectContaining({ birthDate: '1990-04-02' }) })
  })

  it('words the issues for the reason column', () => {
    expect(issuesText([{ field: 'birthDate', reason: 'Not a calendar date' }, { field: 'email', reason: 'Enter a valid e-mail address' }]))
      .toBe('Birth date: Not a calendar date; E-mail: Enter a valid e-mail address')
  })
})
