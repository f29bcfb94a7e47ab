/** The audit desk. Plain objects the routes return, never model instances. */
import type { DeskColumn, DeskTable } from '../utils/audit-desk'

/** Where a desk row leads: its member, vessel, event or fill station page. */
export interface DeskLinkDto {
  to: string
  label: string
}

/** One row of a desk table: its cells by column key. */
export interface DeskRowDto {
  id: string
  link: DeskLinkDto
  cells: Record<string, string | number | null>
}

/** One page of a desk table, with the columns this reader may see. */
export interface DeskPageDto {
  table: DeskTable
  today: string
  columns: DeskColumn[]
  items: DeskRowDto[]
  page: number
  pageSize: number
  total: number
}

/** A desk table's count: the whole, and for a windowed table within 30, 60 and 90 days. */
export interface DeskCountDto {
  table: DeskTable
  total: number
  within: { 30: number, 60: number, 90: number } | null
  /** Further figures of the table (the event table's refused and supervised fills). */
  extra: Record<string, number>
}

export interface DeskCountsDto {
  today: string
  counts: DeskCountDto[]
}

/** Expiries in one chart week (starting `start`). */
export interface DeskExpiryWeekDto {
  start: string
  tiers: number
  training: number
  fitTests: number
  proofs: number
}

/** One event's allowed fills by the tier each was made at (index = rank; `none` without one). */
export interface DeskEventTiersDto {
  eventId: string
  heldOn: string
  site: string
  byRank: number[]
  none: number
}

export interface DeskChartsDto {
  today: string
  weeks: DeskExpiryWeekDto[]
  events: DeskEventTiersDto[]
}
