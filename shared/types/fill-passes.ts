/** The member's own fill pass (`GET`/`POST /api/me/fill-pass`). */
export interface FillPassDto {
  /** The public address the QR code encodes: `<club's public address>/verify/<token>`. */
  verifyUrl: string
  issuedAt: string
  expiresAt: string
  /** The QR code of `verifyUrl`, as SVG. */
  qrSvg: string
}

/** A tier on a verified fill pass: only its code, name and expiry. */
export interface VerifiedTierDto {
  code: string
  name: string
  /** YYYY-MM-DD, the last day it is valid. */
  expiresOn: string
}

/**
 * What anyone holding a fill pass may read (`GET /api/verify/[token]`): the member's name, their valid
 * tiers (highest first) and whether the membership is active. Nothing else, by design.
 */
export interface FillPassVerifyDto {
  name: string
  tiers: VerifiedTierDto[]
  active: boolean
}

/** The member behind a scanned fill pass, for the event's staff (`GET /api/fill-passes/[token]/member`). */
export interface FillPassMemberDto {
  memberId: string
  name: string
}

/** What the launch-side fill page needs for one event (`GET /api/events/[id]/fill-desk`). */
export interface FillDeskDto {
  event: {
    id: string
    /** YYYY-MM-DD in the club's calendar. */
    heldOn: string
    site: string
    pressureCapBar: number
    competition: boolean
    cancelled: boolean
  }
  /** The fill stations the event uses. */
  stations: { id: string, name: string, launchPressureBar: number, gaugeDueOn: string }[]
  /** Whether the caller may fill for others here: `fills.record_any` and on the event's staff. */
  staff: boolean
  /** Whether the caller may record supervised fills (an instructor on the staff). */
  supervisor: boolean
  /** The members registered (not withdrawn), for the staff; empty for everyone else. */
  members: { id: string, name: string }[]
  /** The caller, who fills their own vessels. */
  me: { id: string, name: string }
  /** The club's today (YYYY-MM-DD): fills are recorded only on the event's day. */
  today: string
}
