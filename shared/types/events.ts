import type { FillReason, LimitingFactor } from '../utils/fill-reasons'
import type { GaugeState } from '../utils/event-rules'

/** A fill station (launcher) as the API shows it: both pressures, the gauge and where it stands. */
export interface FillStationDto {
  id: string
  name: string
  description: string
  /** The rated working pressure of its lowest-rated part, bar. */
  lowestPartRatingBar: number
  /** What it may launch at: the rating ÷ the club's equipment factor, bar (full precision). */
  launchLimitBar: number
  equipmentFactor: number
  gaugeName: string
  gaugeCalibratedOn: string
  gaugeIntervalMonths: number
  /** The last day the gauge's calibration is current. */
  gaugeCurrentThrough: string
  gaugeState: GaugeState
  retiredAt: string | null
}

export interface FillStationListDto {
  items: FillStationDto[]
  /** Gauges past calibration or due within 30 days, soonest first (retired stations left out). */
  gaugesDue: FillStationDto[]
  equipmentFactor: number
  today: string
}

/** A member as an event names them (staff, or a member to choose as staff). */
export interface EventPersonDto { id: string, name: string }

/** A launch event in a list. */
export interface LaunchEventListItemDto {
  id: string
  heldOn: string
  site: string
  pressureCapBar: number
  competition: boolean
  cancelled: boolean
  registeredCount: number
  /** Whether the signed-in member is registered (not withdrawn). */
  registered: boolean
}

/** One launch event with everything its page shows. */
export interface LaunchEventDto extends LaunchEventListItemDto {
  notes: string
  cancelReason: string | null
  stations: FillStationDto[]
  staff: EventPersonDto[]
  createdByName: string | null
  today: string
  /** Fills recorded offline that the server, on the facts at that moment, would have refused: for the event's staff and safety officers, else null. */
  flaggedFills: FlaggedFillDto[] | null
  /** What the signed-in member may do here now (the server's own rules). */
  mine: {
    onStaff: boolean
    /** Why registering or withdrawing is not open now, or null. */
    registrationProblem: string | null
    walkInProblem: string | null
  }
}

/** One row of the event's fill log: a fill or a refused attempt. */
export interface FillLogRowDto {
  id: string
  recordedAt: string
  heldOn: string
  member: EventPersonDto
  vesselTag: string
  stationName: string
  pressureBar: number
  enteredPressure: number
  enteredUnit: string
  waterVolumeL: number
  allowed: boolean
  reasons: FillReason[]
  permittedMaxBar: number
  limitingFactor: LimitingFactor
  minimumDistanceM: number
  recordedByName: string
  supervisorName: string | null
}

/** A member's own fill, in their history. */
export interface MyFillDto {
  id: string
  recordedAt: string
  heldOn: string
  eventId: string
  eventSite: string
  vesselTag: string
  pressureBar: number
  allowed: boolean
  reasons: FillReason[]
  supervised: boolean
}

/** One vessel on the roster: in service with its rated fill. */
export interface LaunchRosterVesselDto { id: string, tag: string, name: string, ratedFillBar: number }

/** One registered member on the launch-day roster. */
export interface LaunchRosterRowDto {
  member: EventPersonDto
  walkIn: boolean
  junior: boolean
  /** Highest valid tier (held down to the junior cap for a junior), or null. */
  tierRank: number | null
  tierName: string | null
  tierCapBar: number | null
  /** What they may fill to here: min(tier cap, event cap); 0 with no tier. */
  fillLimitBar: number
  vessels: LaunchRosterVesselDto[]
  missing: { waiver: boolean, course: boolean, dues: boolean }
}

export interface LaunchRosterDto {
  event: { id: string, heldOn: string, site: string, pressureCapBar: number, competition: boolean, cancelled: boolean }
  rows: LaunchRosterRowDto[]
  /** The course every fill needs current (its name as the club calls it). */
  courseName: string
  today: string
}

/**
 * A fill a device allowed without a network that the server, judging it as of the moment it was
 * recorded, would have refused: kept as what happened, with the server's reasons.
 */
export interface FlaggedFillDto {
  id: string
  /** When the device recorded it (ISO instant). */
  recordedAt: string
  member: EventPersonDto
  vesselTag: string
  stationName: string
  pressureBar: number
  recordedByName: string
  reasons: FillReason[]
}
