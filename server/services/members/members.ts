import { QueryTypes } from 'sequelize'
import { Club, Membership, User } from '../../models'
import { membershipStatus, isJunior } from '#shared/utils/membership-status'
import { dateInZone } from '#shared/utils/dates'
import { normaliseRoles } from '#shared/utils/permissions'
import { clubToday } from '../clubs'
import type { MemberDto, MemberListItemDto } from '#shared/types/members'
import type { WaiverStandingDto } from '#shared/types/waivers'

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null)

/** The member's position against the club's current waiver version (one statement). */
export async function waiverStanding(clubId: string, membershipId: string): Promise<WaiverStandingDto> {
  const [row] = await useDb().query<{ current: number | null, accepted: number | null, accepted_at: Date | null }>(`
    SELECT (SELECT max(version) FROM waivers WHERE club_id = :clubId) AS current, latest.version AS accepted, latest.accepted_at
    FROM (SELECT 1) one LEFT JOIN LATERAL (
      SELECT w.version, a.accepted_at FROM waiver_acceptances a JOIN waivers w ON w.id = a.waiver_id
      WHERE a.membership_id = :membershipId ORDER BY w.version DESC LIMIT 1) latest ON true`,
  { replacements: { clubId, membershipId }, type: QueryTypes.SELECT })
  const current = row?.current ?? null
  const accepted = row?.accepted ?? null
  return {
    currentVersion: current,
    acceptedVersion: accepted,
    acceptedAt: iso(row?.accepted_at),
    current: current === null || accepted === current,
  }
}

/** What a directory row is built from: a membership (model or raw row) with its user's name and e-mail. */
export type MemberListSource = Pick<Membership, 'id' | 'roles' | 'approvedAt' | 'paidThrough' | 'suspendedAt' | 'resignedAt' | 'birthDate' | 'createdAt'>
  & { user: Pick<User, 'name' | 'email'> }

/** The directory row for a membership loaded with its user, with its status at `now`. */
export function toMemberListItem(m: MemberListSource, club: Pick<Club, 'timeZone' | 'graceDays'>, now = new Date()): MemberListItemDto {
  return {
    id: m.id,
    name: m.user.name,
    email: m.user.email,
    roles: normaliseRoles(m.roles),
    status: membershipStatus(m, { timeZone: club.timeZone, graceDays: club.graceDays, now }),
    paidThrough: m.paidThrough,
    joinedOn: dateInZone(m.createdAt, club.timeZone),
    junior: isJunior(m.birthDate, clubToday(club, now)),
    approvedAt: iso(m.approvedAt),
  }
}

/** The full member DTO of a membership already loaded with its account and club. */
export async function toMemberDto(m: Membership, user: User, club: Club): Promise<MemberDto> {
  return {
    ...toMemberListItem({ ...m.get(), user }, club),
    suspendedAt: iso(m.suspendedAt),
    suspendedReason: m.suspendedReason,
    resignedAt: iso(m.resignedAt),
    emailVerified: !!user.emailVerifiedAt,
    birthDate: m.birthDate,
    guardianName: m.guardianName,
    guardianEmail: m.guardianEmail,
    guardianConsentAt: iso(m.guardianConsentAt),
    phone: m.phone,
    emergencyContactName: m.emergencyContactName,
    emergencyContactPhone: m.emergencyContactPhone,
    unitPreference: m.unitPreference,
    waiver: await waiverStanding(club.id, m.id),
  }
}

/**
 * The full member DTO for membership `membershipId` in club `clubId`, or null when it is not there
 * (callers answer 404: missing and "not in your club" look the same).
 */
export async function loadMemberDto(clubId: string, membershipId: string): Promise<MemberDto | null> {
  const m = await Membership.findOne({
    where: { id: membershipId, clubId },
    include: [{ model: User, as: 'user' }, { model: Club, as: 'club' }],
  })
  if (!m?.user || !m.club) return null
  return toMemberDto(m, m.user, m.club)
}
