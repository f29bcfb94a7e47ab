import { describe, expect, it } from 'vitest'
import { DESK_CHART_WEEKS, DESK_TABLES, DESK_TABLE_INFO, deskCsvCell, deskWeekOf, isDeskTable } from '../../../shared/utils/audit-desk'
import { DeskQuerySchema } from '../../../shared/schemas/audit-desk'
import { AuditQuerySchema } from '../../../shared/schemas/audit'

describe('deskWeekOf', () => {
  it('puts today and the next six days in week 0, and day 7 in week 1', () => {
    expect(deskWeekOf('2026-03-01', '2026-03-01')).toBe(0)
    expect(deskWeekOf('2026-03-07', '2026-03-01')).toBe(0)
    expect(deskWeekOf('2026-03-08', '2026-03-01')).toBe(1)
  })

  it('counts calendar days across a clock change and a month end', () => {
    expect(deskWeekOf('2026-04-05', '2026-03-29')).toBe(1)
    expect(deskWeekOf('2026-02-01', '2026-01-31')).toBe(0)
  })

  it('leaves out the past and what falls after the chart\'s last week', () => {
    expect(deskWeekOf('2026-02-28', '2026-03-01')).toBeNull()
    const last = new Date(Date.UTC(2026, 2, 1 + DESK_CHART_WEEKS * 7 - 1)).toISOString().slice(0, 10)
    const after = new Date(Date.UTC(2026, 2, 1 + DESK_CHART_WEEKS * 7)).toISOString().slice(0, 10)
    expect(deskWeekOf(last, '2026-03-01')).toBe(DESK_CHART_WEEKS - 1)
    expect(deskWeekOf(after, '2026-03-01')).toBeNull()
  })
})

describe('deskCsvCell', () => {
  it('quotes commas, quotes and line breaks, and writes nothing for null', () => {
    expect(deskCsvCell('North flat, east end')).toBe('"North flat, east end"')
    expect(deskCsvCell('a "b"')).toBe('"a ""b"""')
    expect(deskCsvCell('two\nlines')).toBe('"two\nlines"')
    expect(deskCsvCell(null)).toBe('')
    expect(deskCsvCell(12)).toBe('12')
  })

  it('defuses a cell a spreadsheet would run as a formula', () => {
    expect(deskCsvCell('=HYPERLINK("x")')).toBe('"\'=HYPERLINK(""x"")"')
    expect(deskCsvCell('-3')).toBe('\'-3')
    expect(deskCsvCell('@SUM(A1)')).toBe('\'@SUM(A1)')
  })
})

describe('the desk tables', () => {
  it('each sorts by default on a sortable column of its own and names its standings', () => {
    for (const t of DESK_TABLES) {
      const info = DESK_TABLE_INFO[t]
      expect(info.columns.find(c => c.key === info.defaultSort)?.sortable, t).toBe(true)
      expect(new Set(info.columns.map(c => c.key)).size, t).toBe(info.columns.length)
    }
    expect(isDeskTable('gauges')).toBe(true)
    expect(isDeskTable('members')).toBe(false)
  })

  it('takes a window of 30, 60 or 90 days only (90 when none is given)', () => {
    expect(DeskQuerySchema.parse({}).within).toBe(90)
    expect(DeskQuerySchema.parse({ within: '30' }).within).toBe(30)
    expect(DeskQuerySchema.safeParse({ within: '45' }).success).toBe(false)
    expect(DeskQuerySchema.safeParse({ sort: 'a; DROP TABLE x' }).success).toBe(false)
  })
})

describe('the audit trail\'s subject filter', () => {
  it('takes a kind of record the trail names, and refuses any other', () => {
    expect(AuditQuerySchema.parse({ subjectType: 'vessel' }).subjectType).toBe('vessel')
    expect(AuditQuerySchema.parse({ subjectType: '' }).subjectType).toBeUndefined()
    expect(AuditQuerySchema.safeParse({ subjectType: 'password' }).success).toBe(false)
  })
})
