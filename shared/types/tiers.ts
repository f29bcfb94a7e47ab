import type { TierGap, TierLevel, TierRank, TierState } from '../utils/tier-rules'

/** The club's tier table and its junior cap (GET /api/tiers). */
export interface TierTableDto {
  levels: TierLevel[]
  juniorCapRank: number
  /** The club's courses a tier may require, by code with their names. */
  courses: { code: string, name: string }[]
}

/** One sign-off of a held tier: a grant, a renewal or the club's initial T4. */
export interface TierSignoffDto {
  id: string
  rank: TierRank
  kind: 'grant' | 'renewal' | 'initial'
  signedOn: string
  expiresOn: string
  /** Null only for the initial T4 (granted from the command line). */
  assessor: { id: string, name: string } | null
  notes: string
  evidence: { id: string, contentType: string }[]
}

/** A tier a member holds or held, with its state on the club's today. */
export interface HeldTierDto {
  rank: TierRank
  code: string
  name: string
  fillCapBar: number
  state: TierState
  firstGrantedOn: string
  signedOn: string
  expiresOn: string
  initial: boolean
  suspensionReason: string | null
  revocationReason: string | null
  signoffs: TierSignoffDto[]
}

/** Where a member stands in the pressure tiers: every tier held, the fall-back, and the next step. */
export interface MemberTiersDto {
  membershipId: string
  today: string
  /** Under 18, or no birth date on record. */
  junior: boolean
  birthDateMissing: boolean
  juniorCapRank: number
  /** The highest valid tier (the fall-back rule), or null. */
  validRank: TierRank | null
  /** The highest tier the member may use: the valid one, held down to the junior cap. */
  usableRank: TierRank | null
  held: HeldTierDto[]
  /** The next tier above the valid one and every prerequisite it still needs (null at T4). */
  next: { rank: TierRank, code: string, name: string, fillCapBar: number, gaps: TierGap[] } | null
}
