import type { IncidentKind, IncidentStatus } from '../utils/incident-words'
import type { VesselState } from '../utils/vessel-states'

/** A person named on an incident report. */
export interface IncidentPersonDto {
  membershipId: string
  name: string
}

/** One row of the incident list. */
export interface IncidentListItemDto {
  id: string
  kind: IncidentKind
  status: IncidentStatus
  happenedAt: string
  place: string
  vessel: { id: string, tag: string } | null
  reporter: IncidentPersonDto
  peopleCount: number
}

/** An incident as its reader may see it. */
export interface IncidentDto extends IncidentListItemDto {
  event: { id: string, heldOn: string, site: string } | null
  vesselState: string | null
  people: IncidentPersonDto[]
  whatHappened: string
  /** Whether an injury's personal details were given (everyone who sees the report sees this). */
  injuryDetailsGiven: boolean
  /** The personal details of an injury: only for the safety officer (incidents.review), else null. */
  injuryDetails: string | null
  reviewNotes: string
  findings: string
  actions: string
  closedAt: string | null
  closedBy: IncidentPersonDto | null
  photos: { id: string, url: string, thumbnailUrl: string, caption: string | null }[]
  /** What the reader may do: review, close, suspend tiers (the safety officer, while open). */
  canReview: boolean
  createdAt: string
}

/** A member the report form offers as a person involved: the id and the name, nothing else. */
export interface IncidentPersonChoiceDto {
  membershipId: string
  name: string
}

/** A vessel as the report form shows it, for any vessel of the club: what to check it is the right one. */
export interface IncidentVesselDto {
  tag: string
  name: string
  state: VesselState
}
