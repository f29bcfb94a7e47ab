import { QueryTypes } from 'sequelize'
import { addCalendarDays } from '#shared/utils/dates'
import { tierCode } from '#shared/utils/tier-rules'

/** Days before a tier's expiry that its holder is e-mailed: 60, 30 and 7 (a safety kind). */
export const TIER_EXPIRY_NOTICE_DAYS = [60, 30, 7] as const

export interface ExpiringTier {
  memberTierId: string
  membershipId: string
  email: string
  name: string
  tierCode: string
  tierName: string
  expiresOn: string
  /** The tightest warning reached on today: 60, 30 or 7. */
  daysBefore: number
}

/**
 * Tiers of club `clubId` that are neither suspended nor revoked and expire within the next 60 days
 * (from the club's `today`), of members still in the club, each with the tightest warning reached.
 */
export async function tiersExpiringSoon(clubId: string, today: string): Promise<ExpiringTier[]> {
  const rows = await useDb().query<{ id: string, membership_id: string, email: string, name: string, rank: number, tier_name: string, expires_on: string }>(
    `SELECT t.id, t.membership_id, u.email, u.name, t.rank, l.name AS tier_name, t.expires_on::text AS expires_on
       FROM member_tiers t JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
       JOIN memberships m ON m.id = t.membership_id JOIN users u ON u.id = m.user_id
      WHERE t.club_id = :clubId AND t.confirmed_at IS NOT NULL AND t.suspended_at IS NULL AND t.revoked_at IS NULL AND t.expires_on BETWEEN :today AND :until
        AND m.resigned_at IS NULL AND m.suspended_at IS NULL
      ORDER BY t.expires_on, t.id`,
    { replacements: { clubId, today, until: addCalendarDays(today, TIER_EXPIRY_NOTICE_DAYS[0]) }, type: QueryTypes.SELECT })
  return rows.map(r => ({
    memberTierId: r.id, membershipId: r.membership_id, email: r.email, name: r.name, tierCode: tierCode(r.rank), tierName: r.tier_name,
    expiresOn: r.expires_on, daysBefore: [...TIER_EXPIRY_NOTICE_DAYS].reverse().find(d => addCalendarDays(r.expires_on, -d) <= today)!,
  }))
}
