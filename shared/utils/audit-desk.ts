/**
 * The safety officer's audit desk: its tables, their columns and what each sorts and filters by. The
 * server, the desk page and the CSV take the columns from here, so a column has one label everywhere.
 */
import { csvCell } from './csv'

export const DESK_TABLES = [
  'tiers-expiring', 'training-expiring', 'fit-tests-expiring', 'tiers-lapsed', 'refused-next',
  'proofs', 'vessels-held', 'gauges', 'event-fills', 'incidents',
] as const
export type DeskTable = typeof DESK_TABLES[number]

/** The look-ahead windows of the expiring tables, days. */
export const DESK_WINDOWS = [30, 60, 90] as const
export type DeskWindow = typeof DESK_WINDOWS[number]

/** Weeks the expiries chart looks ahead. */
export const DESK_CHART_WEEKS = 26
/** Most recent events (with fills) the fills-by-tier chart shows. */
export const DESK_CHART_EVENTS = 8

export interface DeskColumn {
  key: string
  label: string
  sortable: boolean
}

export interface DeskTableInfo {
  title: string
  /** What a row is, for the empty line and the pager ("tier" → "No tier …"). */
  noun: string
  /** What the table lists, one sentence. */
  meaning: string
  columns: DeskColumn[]
  defaultSort: string
  defaultDir: 'asc' | 'desc'
  /** Whether the 30/60/90-day window narrows it. */
  windowed: boolean
  /** The values of its `state` filter, with their words (empty: no such filter). */
  states: Record<string, string>
  /** What the free-text filter searches. */
  search: string
}

const col = (key: string, label: string, sortable = true): DeskColumn => ({ key, label, sortable })

export const DESK_TABLE_INFO: Record<DeskTable, DeskTableInfo> = {
  'tiers-expiring': {
    title: 'Tiers expiring', noun: 'tier', meaning: 'Tiers in force that expire within the window.',
    columns: [col('member', 'Member'), col('tier', 'Tier'), col('expiresOn', 'Expires'), col('daysLeft', 'Days left')],
    defaultSort: 'expiresOn', defaultDir: 'asc', windowed: true, states: {}, search: 'member',
  },
  'training-expiring': {
    title: 'Training expiring', noun: 'training record', meaning: 'Members\' latest passed training records that expire within the window (fit tests apart).',
    columns: [col('member', 'Member'), col('course', 'Course'), col('expiresOn', 'Expires'), col('daysLeft', 'Days left')],
    defaultSort: 'expiresOn', defaultDir: 'asc', windowed: true, states: {}, search: 'member or course',
  },
  'fit-tests-expiring': {
    title: 'Respirator fit tests expiring', noun: 'fit test', meaning: 'Members\' latest passed respirator fit tests that expire within the window.',
    columns: [col('member', 'Member'), col('expiresOn', 'Expires'), col('daysLeft', 'Days left')],
    defaultSort: 'expiresOn', defaultDir: 'asc', windowed: true, states: {}, search: 'member',
  },
  'tiers-lapsed': {
    title: 'Lapsed and suspended tiers', noun: 'tier', meaning: 'Tiers past their expiry or suspended by the safety officer (revoked ones apart).',
    columns: [col('member', 'Member'), col('tier', 'Tier'), col('state', 'Standing'), col('since', 'Since'), col('reason', 'Reason', false)],
    defaultSort: 'since', defaultDir: 'desc', windowed: false, states: { lapsed: 'Lapsed', suspended: 'Suspended' }, search: 'member',
  },
  'refused-next': {
    title: 'Refused at the next event', noun: 'member', meaning: 'Members whose tier lapsed or was suspended since their last fill, with no current tier as high: the fill gate will refuse them at that tier.',
    columns: [col('member', 'Member'), col('tier', 'Tier'), col('state', 'Standing'), col('since', 'Since'), col('lastFillOn', 'Last fill')],
    defaultSort: 'since', defaultDir: 'desc', windowed: false, states: { lapsed: 'Lapsed', suspended: 'Suspended' }, search: 'member',
  },
  'proofs': {
    title: 'Proofs lapsing or lapsed', noun: 'vessel', meaning: 'Vessels in service whose proof has lapsed (interval, fill count or an event) or runs out within the window.',
    columns: [col('vessel', 'Vessel'), col('name', 'Name'), col('owner', 'Owner'), col('state', 'Standing'), col('validThrough', 'Proof current through'), col('fillsSinceProof', 'Fills since proof'), col('fillsRemaining', 'Fills left')],
    defaultSort: 'validThrough', defaultDir: 'asc', windowed: true, states: { lapsing: 'Lapsing', lapsed: 'Lapsed' }, search: 'tag, name or owner',
  },
  'vessels-held': {
    title: 'Quarantined and failed vessels', noun: 'vessel', meaning: 'Vessels out of service: held in quarantine or failed at proof.',
    columns: [col('vessel', 'Vessel'), col('name', 'Name'), col('owner', 'Owner'), col('state', 'State'), col('since', 'Since')],
    defaultSort: 'since', defaultDir: 'desc', windowed: false, states: { quarantined: 'Quarantined', failed: 'Failed' }, search: 'tag, name or owner',
  },
  'gauges': {
    title: 'Gauges due for calibration', noun: 'gauge', meaning: 'Fill stations\' gauges whose calibration runs out soon or has run out.',
    columns: [col('station', 'Fill station'), col('gauge', 'Gauge'), col('calibratedOn', 'Calibrated'), col('currentThrough', 'Current through'), col('state', 'Standing')],
    defaultSort: 'currentThrough', defaultDir: 'asc', windowed: false, states: { due_soon: 'Calibration due soon', past_due: 'Past calibration' }, search: 'station or gauge',
  },
  'event-fills': {
    title: 'Refused and supervised fills per event', noun: 'event', meaning: 'Each launch event with fills: how many were allowed, refused and supervised.',
    columns: [col('heldOn', 'Held on'), col('site', 'Site'), col('fills', 'Fills'), col('refused', 'Refused'), col('supervised', 'Supervised')],
    defaultSort: 'heldOn', defaultDir: 'desc', windowed: false, states: {}, search: 'site',
  },
  'incidents': {
    title: 'Open incidents', noun: 'incident', meaning: 'Incidents reported and not yet closed.',
    columns: [col('happenedAt', 'When'), col('kind', 'Kind'), col('place', 'Where'), col('vessel', 'Vessel'), col('reporter', 'Reported by'), col('people', 'People involved'), col('injuryDetails', 'Injury details', false)],
    defaultSort: 'happenedAt', defaultDir: 'desc', windowed: false,
    states: { burst: 'Burst', uncommanded_launch: 'Uncommanded launch', injury: 'Injury', near_miss: 'Near miss', other: 'Other' }, search: 'place or vessel',
  },
}

/** Columns only the safety officer sees (admins read the desk without an injury's personal details). */
export const OFFICER_ONLY_COLUMNS = ['injuryDetails'] as const

/** Whether `value` names a desk table. */
export function isDeskTable(value: string): value is DeskTable {
  return (DESK_TABLES as readonly string[]).includes(value)
}

/** The week (0 = the seven days from `today`) in which `date` falls, or null outside the chart's weeks. */
export function deskWeekOf(date: string, today: string): number | null {
  const days = Math.round((Date.parse(`${date}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / 86_400_000)
  if (days < 0) return null
  const week = Math.floor(days / 7)
  return week < DESK_CHART_WEEKS ? week : null
}

/** One CSV cell of a desk table: the shared CSV writer's cell (quoted when needed, a leading formula character defused). */
export const deskCsvCell: (v: string | number | null) => string = csvCell
