/**
 * Incidents in words: the kinds a member reports and the states a report passes through. Pages,
 * e-mails and the server take their words from here.
 */
import type { Words } from './words'

export const INCIDENT_KINDS = ['burst', 'uncommanded_launch', 'injury', 'near_miss', 'other'] as const
export type IncidentKind = typeof INCIDENT_KINDS[number]

export const INCIDENT_KIND_WORDS: Record<IncidentKind, Words> = {
  burst: { label: 'Burst', meaning: 'A vessel burst under pressure, on the launcher, at a fill or in a proof test.' },
  uncommanded_launch: { label: 'Uncommanded launch', meaning: 'A rocket left the launcher before the launch was called (a release that let go early).' },
  injury: { label: 'Injury', meaning: 'Someone was hurt. The personal details are seen by the safety officer only.' },
  near_miss: { label: 'Near miss', meaning: 'Nobody was hurt and nothing broke, but it could have gone otherwise.' },
  other: { label: 'Other', meaning: 'Anything else the safety officer should look at.' },
}

export const INCIDENT_STATUSES = ['open', 'closed'] as const
export type IncidentStatus = typeof INCIDENT_STATUSES[number]

export const INCIDENT_STATUS_WORDS: Record<IncidentStatus, Words> = {
  open: { label: 'Open', meaning: 'The safety officer has still to review and close it. An open incident holds back the renewal of the tiers of the people involved.' },
  closed: { label: 'Closed', meaning: 'The safety officer reviewed it and closed it. Closing does not release a quarantined vessel.' },
}

/** What a member reads on the report form and page about the vessel: reporting holds it at once. */
export const INCIDENT_VESSEL_NOTE = 'Naming a vessel quarantines it at once: no fills until the safety officer releases it, and then only after a new passing proof test.'
