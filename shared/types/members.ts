import type { Role } from '../utils/permissions'
import type { MembershipStatus } from '../utils/membership-status'
import type { ClubDto } from './clubs'
import type { WaiverStandingDto } from './waivers'
import type { MemberTiersDto } from './tiers'

/** Members (a person's membership in the club) and my standing. Plain objects the routes return, never model instances. */

export interface MemberListItemDto {
  id: string
  name: string
  email: string
  roles: Role[]
  status: MembershipStatus
  paidThrough: string | null
  joinedOn: string
  junior: boolean
  /** When an admin approved the sign-up (a pending member is "awaiting approval" until then). */
  approvedAt: string | null
}

export interface MemberDto extends MemberListItemDto {
  suspendedAt: string | null
  suspendedReason: string | null
  resignedAt: string | null
  emailVerified: boolean
  birthDate: string | null
  guardianName: string | null
  guardianEmail: string | null
  guardianConsentAt: string | null
  phone: string | null
  emergencyContactName: string | null
  emergencyContactPhone: string | null
  unitPreference: 'bar' | 'psi'
  waiver: WaiverStandingDto
}

/** "My standing": everything about the signed-in member on one page. */
export interface StandingDto {
  member: MemberDto
  club: ClubDto
  today: string
  /** Days left until paid-through (negative once passed), or null when never paid. */
  daysToExpiry: number | null
  /** Things the member should do, in plain sentences. */
  attention: { code: string, message: string, to?: string }[]
  /** Every pressure tier held, and what the next one still needs. */
  tiers: MemberTiersDto
}

/** One line of "what needs my attention" (StandingDto.attention). */
export type AttentionItem = StandingDto['attention'][number]
