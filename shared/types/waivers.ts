/** Waivers and a member's standing against the one in force. Plain objects the routes return, never model instances. */

export interface WaiverStandingDto {
  currentVersion: number | null
  acceptedVersion: number | null
  acceptedAt: string | null
  /** True when the member has accepted the version in force (or none is published). */
  current: boolean
}

export interface WaiverDto {
  id: string
  version: number
  title: string
  body: string
  publishedAt: string
  publishedByName: string | null
}

/** A waiver version in the history, with how many members accepted it. */
export interface WaiverVersionDto extends WaiverDto {
  acceptances: number
}

/** GET /api/waivers/current: the version in force (null when none is published) and my standing against it. */
export interface CurrentWaiverDto {
  waiver: WaiverDto | null
  standing: WaiverStandingDto
}

/** POST /api/waivers/accept: my standing after accepting; `alreadyAccepted` when it had been accepted before. */
export interface WaiverAcceptedDto {
  standing: WaiverStandingDto
  alreadyAccepted: boolean
}
