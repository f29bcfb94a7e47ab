import type { FillReasonCode } from '../utils/fill-reasons'
import type { FillGateFacts } from '../utils/fill-gate'
import type { MembershipStatus } from '../utils/membership-status'
import type { TierRank } from '../utils/tier-rules'
import type { PressureEntryUnit } from '../utils/units'
import type { DistanceRule } from '../utils/vessel-arithmetic'

/** The shape's version; the fill page refuses a snapshot of any other. */
export const FILL_SNAPSHOT_VERSION = 1

/** A vessel in a snapshot, as it stands on the event's day (before any fill there). */
export interface SnapshotVessel {
  id: string
  tag: string
  ownerMembershipId: string
  /** Effective state on the event's day: `retest_due` when its proof has lapsed by then (time, events or fills). */
  state: FillGateFacts['vessel']['state']
  /** The rated fill while in service, else null. */
  ratedFillBar: number | null
  metalInPressurePath: boolean
  volumeL: number
  /** The fills reserved for this device: it may record at most this many; null when no fill-count limit applies. */
  reservedFills: number | null
}

/** A member in a snapshot (every member not resigned), facts as of the event's day. */
export interface SnapshotMember {
  id: string
  name: string
  status: MembershipStatus
  waiverAccepted: boolean
  /** Under 18 on the event's day, or no birth date on record. */
  junior: boolean
  guardianConsent: boolean
  /** The valid tiers on the event's day (confirmed, not suspended or revoked, not expired). */
  tiers: { rank: TierRank, expiresOn: string }[]
  /** The highest of `tiers`, or null. */
  validRank: TierRank | null
  /** Course code → whether current on the event's day (codes the member never passed are absent). */
  courses: Record<string, boolean>
  /** The id of the member's live fill pass (null: none); a scanned pass with another id is refused. */
  fillPassId: string | null
  /** The member's vessels that are not retired or failed. */
  vessels: SnapshotVessel[]
}

/** A member of the event's staff. */
export interface SnapshotStaff {
  membershipId: string
  name: string
  instructor: boolean
  validRank: TierRank | null
}

/** A fill station of the club (not retired), and whether the event uses it. */
export interface SnapshotStation {
  id: string
  name: string
  atEvent: boolean
  /** Lowest rated part ÷ the club's equipment factor, in bar. */
  launchLimitBar: number
  /** YYYY-MM-DD, the last day the gauge's calibration is current. */
  gaugeCurrentThrough: string
}

/**
 * Everything the launch-side fill page decides on without a network, for one event and one device.
 * Date rules are evaluated for the event's day, not the download's.
 */
export interface FillSnapshot {
  version: typeof FILL_SNAPSHOT_VERSION
  clubId: string
  clubName: string
  /** The club's IANA time zone: the device's date is taken in it. */
  timeZone: string
  deviceId: string
  /** ISO instant the server made the snapshot. */
  issuedAt: string
  /** The staff member who downloaded it: the caller of every fill recorded on the device. */
  issuedByMembershipId: string
  event: { id: string, site: string, heldOn: string, pressureCapBar: number, competition: boolean }
  /** The club's tier table, rank order. */
  tiers: { rank: TierRank, code: string, name: string, fillCapBar: number, requiredCourseCodes: string[] }[]
  juniorCapRank: number
  /**
   * The club's standoff rule, so the page shows the distance beside an offline verdict as the online
   * check does. Optional: a snapshot issued before it was added still verifies and decides (no standoff).
   */
  distanceRule?: DistanceRule
  courses: { code: string, name: string }[]
  members: SnapshotMember[]
  staff: SnapshotStaff[]
  stations: SnapshotStation[]
}

/**
 * A snapshot as the server sends it (`POST /api/events/[id]/fill-snapshots`): the exact UTF-8 bytes of
 * the snapshot's JSON, base64, and the club key's ECDSA P-256 / SHA-256 signature over those bytes in
 * Web Crypto's encoding (IEEE P1363: r ‖ s, 64 bytes), base64. The page stores and verifies these bytes.
 */
export interface SignedFillSnapshotDto {
  snapshot: string
  signature: string
}

/** The club's public key for snapshots (`GET /api/fill-snapshots/key`), as a JWK (kty EC, crv P-256). */
export interface FillSnapshotKeyDto {
  clubId: string
  publicKeyJwk: { kty: 'EC', crv: 'P-256', x: string, y: string }
}

/** What a device sends for each fill or refusal it recorded offline. */
export interface OfflineFillItem {
  /** Made on the device (a UUID); the same id twice is one fill. */
  clientId: string
  /** ISO instant the device recorded it. */
  recordedAt: string
  memberId: string
  vesselId: string
  stationId: string
  pressure: number
  unit: PressureEntryUnit
  waterVolumeL: number
  supervised: boolean
  /** The device's decision and its reasons (empty when allowed). */
  allowed: boolean
  reasonCodes: FillReasonCode[]
}

/** How the server took one queued item (`POST /api/events/[id]/fill-sync`). */
export type OfflineFillOutcome = 'recorded' | 'duplicate' | 'flagged' | 'conflict'

/** One item's answer: `conflict` (status 409) when the client id is known with a different body. */
export interface OfflineFillResultDto {
  clientId: string
  outcome: OfflineFillOutcome
  status: 201 | 200 | 409
  /** The reasons the server finds, judged as of the moment the device recorded the fill. */
  reasonCodes: FillReasonCode[]
}

/** The sync route's answer: one result per item, in the order sent. */
export interface FillSyncResultDto {
  results: OfflineFillResultDto[]
}
