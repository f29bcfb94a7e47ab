import type { Club } from '../../models'
import { toMemberDto } from './members'
import { DUES_RENEWAL_NOTICE_DAYS } from '#shared/utils/membership-status'
import { addCalendarDays, daysBetween, formatCalendarDate as long } from '#shared/utils/dates'
import { clubToday } from '../clubs'
import { memberTierStanding } from '../tiers'
import type { AttentionItem, MemberDto, StandingDto } from '#shared/types/members'
import type { ClubDto } from '#shared/types/clubs'
import type { Actor } from '../../utils/auth'

/** The club as the member's screens see it. */
export function toClubDto(club: Club): ClubDto {
  return { id: club.id, name: club.name, timeZone: club.timeZone, units: club.units, graceDays: club.graceDays }
}

/**
 * What the member should do next, most pressing first, each a plain sentence with a link.
 * Codes are stable: SUSPENDED, RESIGNED, EMAIL_UNVERIFIED, AWAITING_APPROVAL, DUES_NEVER_PAID,
 * DUES_LAPSED, DUES_GRACE, DUES_EXPIRING, WAIVER_NOT_ACCEPTED, BIRTH_DATE_MISSING, GUARDIAN_CONSENT_MISSING.
 * Dues items are left out while suspended or resigned (the admin's action says it all), and
 * DUES_NEVER_PAID waits until the sign-up is approved.
 */
export function attentionFor(member: MemberDto, club: ClubDto, today: string): AttentionItem[] {
  const items: AttentionItem[] = []
  const awaitingApproval = !member.approvedAt && member.status !== 'suspended' && member.status !== 'resigned'
  if (member.status === 'suspended') {
    items.push({ code: 'SUSPENDED', message: `Your membership is suspended${member.suspendedReason ? `: ${member.suspendedReason}` : ''}. Talk to the club's admin.`, to: '/standing' })
  }
  if (member.status === 'resigned') {
    items.push({ code: 'RESIGNED', message: 'You have resigned from the club. Paying dues again brings you back.', to: '/standing' })
  }
  if (!member.emailVerified) {
    items.push({ code: 'EMAIL_UNVERIFIED', message: 'Confirm your e-mail address with the link we sent you.', to: '/profile' })
  }
  if (awaitingApproval) {
    items.push({ code: 'AWAITING_APPROVAL', message: 'Your sign-up is waiting for the club\'s admin to approve it.', to: '/standing' })
  }
  if (member.status === 'pending' && !awaitingApproval) {
    items.push({ code: 'DUES_NEVER_PAID', message: 'Pay your first dues to become an active member.', to: '/standing' })
  }
  if (member.status === 'lapsed' && member.paidThrough) {
    items.push({ code: 'DUES_LAPSED', message: `Your membership lapsed: dues were paid through ${long(member.paidThrough)}. Renewing lets you train and book again; a fill also needs a valid pressure tier, the current waiver, a current pressure-safety course and a vessel in service.`, to: '/standing' })
  }
  if (member.status === 'grace' && member.paidThrough) {
    const graceEnds = addCalendarDays(member.paidThrough, club.graceDays)
    items.push({ code: 'DUES_GRACE', message: `Your dues ran out after ${long(member.paidThrough)}. You can still train until ${long(graceEnds)}, but not fill or book: renew now.`, to: '/standing' })
  }
  if (member.status === 'active' && member.paidThrough) {
    const left = daysBetween(today, member.paidThrough)
    if (left <= DUES_RENEWAL_NOTICE_DAYS) {
      items.push({ code: 'DUES_EXPIRING', message: `Your dues are paid through ${long(member.paidThrough)} (${left === 0 ? 'today is the last day' : `${left} day${left === 1 ? '' : 's'} left`}). Renew in time.`, to: '/standing' })
    }
  }
  if (!member.waiver.current) {
    items.push({
      code: 'WAIVER_NOT_ACCEPTED',
      message: member.waiver.acceptedVersion
        ? `The club published a new waiver (version ${member.waiver.currentVersion}). Read and accept it before your next fill.`
        : 'Read and accept the club\'s waiver before your first fill.',
      to: '/waiver',
    })
  }
  if (!member.birthDate) {
    items.push({ code: 'BIRTH_DATE_MISSING', message: 'Your birth date is not on record: until the club\'s admin adds it, you count as a junior for every fill and tier rule.', to: '/standing' })
  }
  if (member.junior && !member.guardianConsentAt) {
    items.push({ code: 'GUARDIAN_CONSENT_MISSING', message: `Your guardian${member.guardianName ? ` (${member.guardianName})` : ''} has not yet confirmed their consent from the link we e-mailed them.`, to: '/standing' })
  }
  return items
}

/** "My standing" for the signed-in member: the member DTO, the club, today there, and what needs attention. */
export async function loadStanding(actor: Actor): Promise<StandingDto | null> {
  // The actor was loaded with its account and club for this request: no second read of them.
  const member = await toMemberDto(actor.membership, actor.user, actor.club)
  const club = toClubDto(actor.club)
  const today = clubToday(club)
  return {
    member,
    club,
    today,
    daysToExpiry: member.paidThrough ? daysBetween(today, member.paidThrough) : null,
    attention: attentionFor(member, club, today),
    tiers: (await memberTierStanding(club.id, actor.membership.id, today))!,
  }
}
