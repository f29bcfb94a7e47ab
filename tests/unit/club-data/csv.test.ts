import { describe, expect, it } from 'vitest'
import Papa from 'papaparse'
import { csvCell, toCsv } from '../../../shared/utils/csv'

// OWASP, "CSV Injection": prefix a cell starting with =, +, -, @, tab or carriage return with a single quote.
describe('csvCell neutralises formulas', () => {
  it.each([
    ['=SUM(A1)', '\'=SUM(A1)'],
    ['+123', '\'+123'],
    ['-2+3', '\'-2+3'],
    ['@cmd', '\'@cmd'],
    ['\tindented', '\'\tindented'],
    ['\rreturn', '"\'\rreturn"'],
    ['=HYPERLINK("x")', '"\'=HYPERLINK(""x"")"'],
    ['plain', 'plain'],
    ['a, b', '"a, b"'],
    ['two\nlines', '"two\nlines"'],
    ['mid=dle', 'mid=dle'],
  ])('%j → %j', (value, cell) => {
    expect(csvCell(value)).toBe(cell)
  })

  it.each([
    [-5, '-5'],
    [0, '0'],
    [12.5, '12.5'],
    [Number.NaN, ''],
  ])('the number %j stays a number: %j', (value, cell) => {
    expect(csvCell(value)).toBe(cell)
  })

  it.each([
    [null, ''],
    [undefined, ''],
    [true, 'yes'],
    [false, 'no'],
  ])('%j → %j', (value, cell) => {
    expect(csvCell(value)).toBe(cell)
  })

  it('writes a document a CSV reader reads back: text defused, numbers as numbers', () => {
    const text = toCsv(['name', 'pressure_bar', 'note'], [['=SUM(A1)', -1.5, 'a "quoted", note'], ['+44 20', 6, null]])
    expect(text.endsWith('\r\n')).toBe(true)
    const parsed = Papa.parse<Record<string, unknown>>(text, { header: true, dynamicTyping: true, skipEmptyLines: true })
    expect(parsed.errors).toEqual([])
    expect(parsed.data).toEqual([
      { name: '\'=SUM(A1)', pressure_bar: -1.5, note: 'a "quoted", note' },
      { name: '\'+44 20', pressure_bar: 6, note: null },
    ])
  })
})
