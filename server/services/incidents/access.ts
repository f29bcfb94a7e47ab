import type { Actor } from '../../utils/auth'

/** What a reader may see of the incidents: every report or only their own, and an injury's personal details. */
export interface IncidentAccess {
  /** The safety officer (incidents.review) or an officer who reads the audit trail (audit.read). */
  all: boolean
  /** Only the safety officer (incidents.review) reads the personal details of an injury. */
  injury: boolean
  /** The safety officer reviews, closes and suspends tiers from the incident page. */
  review: boolean
}

/** The incident rights of `actor`. */
export function incidentAccess(actor: Actor): IncidentAccess {
  const review = actorCan(actor, 'incidents.review')
  return { all: review || actorCan(actor, 'audit.read'), injury: review, review }
}
