import { describe, expect, it } from 'vitest'
import {
  backupFolderName, backupSettings, backupsToPrune, clientMismatch, countDifferences, msUntilNext, parseClientMajor, parseTimeOfDay,
} from '../../../scripts/lib/backup.mjs'

describe('parseClientMajor', () => {
  it.each([
    ['pg_dump (PostgreSQL) 15.10 (Debian 15.10-0+deb12u1)', 15],
    ['pg_restore (PostgreSQL) 16.4', 16],
    ['pg_dump (PostgreSQL) 9.6.24', 9],
    ['pg_dump: command not found', null],
  ])('%s → %s', (line, major) => {
    expect(parseClientMajor(line)).toBe(major)
  })
})

describe('clientMismatch: the client must be of the server\'s major version', () => {
  it('accepts the same major', () => {
    expect(clientMismatch({ tool: 'pg_dump', clientMajor: 15, serverMajor: 15 })).toBeNull()
  })

  it.each([
    [14, 15, 'The database server runs PostgreSQL 15 but pg_dump 14 is the PostgreSQL client here'],
    [17, 15, 'The database server runs PostgreSQL 15 but pg_dump 17 is the PostgreSQL client here'],
    [null, 16, 'The database server runs PostgreSQL 16 but pg_dump of an unknown version is the PostgreSQL client here'],
  ])('refuses client %s on server %s, saying which client to install', (clientMajor, serverMajor, words) => {
    const message = clientMismatch({ tool: 'pg_dump', clientMajor, serverMajor })
    expect(message).toContain(words)
    expect(message).toContain(`postgresql-client-${serverMajor}`)
  })
})

describe('backupsToPrune', () => {
  const names = ['hoopwise-2026-12-01T02-30-00Z', 'hoopwise-2026-12-03T02-30-00Z', 'hoopwise-2026-12-02T02-30-00Z', 'notes.txt', 'hoopwise-2026-12-04T02-30-00Z.partial']
  it.each([
    [1, ['hoopwise-2026-12-01T02-30-00Z', 'hoopwise-2026-12-02T02-30-00Z']],
    [2, ['hoopwise-2026-12-01T02-30-00Z']],
    [3, []],
    [7, []],
  ])('keeping %s deletes the oldest backups only, never other files', (keep, pruned) => {
    expect(backupsToPrune(names, keep)).toEqual(pruned)
  })

  it('names folders by UTC time, so that they sort by age', () => {
    expect(backupFolderName(new Date('2026-12-03T02:30:05.123Z'))).toBe('hoopwise-2026-12-03T02-30-05Z')
  })
})

describe('the nightly time', () => {
  it.each(['02:30', '0:05', '23:59'])('reads %s', (text) => {
    expect(() => parseTimeOfDay(text)).not.toThrow()
  })

  it.each(['24:00', '2.30', '02:60', 'nightly', ''])('refuses %s in words', (text) => {
    expect(() => parseTimeOfDay(text)).toThrow(/HOOPWISE_BACKUP_AT must be a time of day such as 02:30/)
  })

  it('waits until the next such time of day, tomorrow once it has passed', () => {
    const now = new Date(2026, 11, 3, 1, 0, 0)
    expect(msUntilNext('02:30', now)).toBe(90 * 60_000)
    expect(msUntilNext('00:30', now)).toBe(23.5 * 3600_000)
    expect(msUntilNext('01:00', now)).toBe(24 * 3600_000)
  })
})

describe('backupSettings', () => {
  it('keeps 7 backups under .local/backups by default, and no nightly one', () => {
    const s = backupSettings({})
    expect(s).toMatchObject({ keep: 7, at: '' })
    expect(s.backupsDir).toMatch(/\.local\/backups$/)
    expect(s.uploadsDir).toMatch(/\.local\/uploads$/)
  })

  it.each(['0', '-1', '2.5', 'all'])('refuses HOOPWISE_BACKUP_KEEP=%s', (keep) => {
    expect(() => backupSettings({ HOOPWISE_BACKUP_KEEP: keep })).toThrow(/HOOPWISE_BACKUP_KEEP must be a whole number of at least 1/)
  })
})

describe('countDifferences', () => {
  it('names each table whose rows differ, and tables on one side only', () => {
    expect(countDifferences({ a: 1, b: 2, c: 3 }, { a: 1, b: 5, d: 0 })).toEqual([
      'b: 2 in the backup → 5 restored',
      'c: 3 in the backup → no table restored',
      'd: no table in the backup → 0 restored',
    ])
    expect(countDifferences({ a: 1 }, { a: 1 })).toEqual([])
  })
})
