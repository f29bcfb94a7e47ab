import { QueryTypes } from 'sequelize'
import { MEMBERSHIP_STATUSES, MEMBERSHIP_STATUS_WORDS, type MembershipStatus } from '#shared/utils/membership-status'
import type { StandingDto } from '#shared/types/members'
import type { Card, CardProvider } from '../dashboard/provider'
import { statusCountColumnsSql } from './status-sql'

// The status function as SQL (its one copy), with this file's replacements.
const STATUS_COUNTS_SQL = statusCountColumnsSql({ today: ':today', graceDays: ':graceDays' })

const days = (n: number) => `${n} day${n === 1 ? '' : 's'}`

/** Cards every member gets: their own status, waiver and paid-through date. */
function myCards(s: StandingDto): Card[] {
  const m = s.member
  const dues: Card = m.paidThrough
    ? { key: 'my-paid-through', title: 'Dues paid through', value: m.paidThrough, hint: s.daysToExpiry! >= 0 ? `${days(s.daysToExpiry!)} left.` : `Ran out ${days(-s.daysToExpiry!)} ago.`, to: '/standing', tone: s.daysToExpiry! > 30 ? 'ok' : 'attention', group: 'mine' }
    : { key: 'my-paid-through', title: 'Dues paid through', value: 'Never paid', hint: 'Your first dues make you an active member.', to: '/standing', tone: 'attention', group: 'mine' }
  return [
    { key: 'my-status', title: 'Status', value: MEMBERSHIP_STATUS_WORDS[m.status].label, hint: MEMBERSHIP_STATUS_WORDS[m.status].meaning, to: '/standing', tone: m.status === 'active' ? 'ok' : 'attention', group: 'mine' },
    {
      key: 'my-waiver',
      title: 'Waiver',
      value: m.waiver.currentVersion === null ? 'None published' : m.waiver.current ? `Version ${m.waiver.currentVersion} accepted` : 'Not accepted',
      hint: m.waiver.current ? 'Nothing to do.' : `Read and accept version ${m.waiver.currentVersion}.`,
      to: '/waiver',
      tone: m.waiver.current ? 'ok' : 'attention',
      group: 'mine',
    },
    dues,
  ]
}

/** members.read: how many members the club has in each status. */
async function memberCards(clubId: string, today: string, graceDays: number): Promise<Card[]> {
  const [row] = await useDb().query<Record<MembershipStatus, number>>(`
    SELECT ${STATUS_COUNTS_SQL} FROM memberships m WHERE m.club_id = :clubId`,
  { replacements: { clubId, today, graceDays }, type: QueryTypes.SELECT })
  const byStatus = new Map(MEMBERSHIP_STATUSES.map(s => [s, row?.[s] ?? 0]))
  return MEMBERSHIP_STATUSES.map(status => ({
    key: `members-${status}`,
    title: MEMBERSHIP_STATUS_WORDS[status].label,
    value: byStatus.get(status) ?? 0,
    hint: MEMBERSHIP_STATUS_WORDS[status].meaning,
    to: `/members?status=${status}`,
    tone: (status === 'grace' || status === 'lapsed') && byStatus.get(status) ? 'attention' : 'neutral',
    group: 'members',
  }))
}

/**
 * members.manage: sign-ups waiting for the admin's approval (the pending list it links to also holds
 * approved, unpaid members), and how many of them are ready: the e-mail confirmed and, for a junior
 * (under 18 on the club's `today`), the guardian's consent given (the rule of shared/utils/approval.ts).
 */
async function approvalCard(clubId: string, today: string): Promise<Card> {
  const [row] = await useDb().query<{ n: number, ready: number }>(`
    SELECT count(*)::int AS n,
      count(*) FILTER (WHERE u.email_verified_at IS NOT NULL AND (m.guardian_consent_at IS NOT NULL
        OR m.birth_date IS NULL OR m.birth_date <= (CAST(:today AS date) - interval '18 years')::date))::int AS ready
    FROM memberships m JOIN users u ON u.id = m.user_id
    WHERE m.club_id = :clubId AND m.approved_at IS NULL AND m.suspended_at IS NULL AND m.resigned_at IS NULL`,
  { replacements: { clubId, today }, type: QueryTypes.SELECT })
  const n = row?.n ?? 0
  const ready = row?.ready ?? 0
  const waiting = n - ready
  const hint = !n
    ? 'No sign-up is waiting.'
    : `${ready} ready to approve${waiting ? `; ${waiting} still wait${waiting === 1 ? 's' : ''} for a confirmed e-mail or a guardian's consent` : ''}. The pending list also shows approved members who have not paid yet.`
  return { key: 'pending-approvals', title: 'Sign-ups to approve', value: n, hint, to: '/members?status=pending', tone: ready ? 'attention' : n ? 'neutral' : 'ok', group: 'office' }
}

/** Every member: their own status, waiver and paid-through date. */
export const myStandingCards: CardProvider = { cards: ({ standing }) => myCards(standing) }

/** members.read: the club's members by status. */
export const memberStatusCards: CardProvider = {
  capability: 'members.read',
  cards: ({ actor, standing }) => memberCards(actor.club.id, standing.today, actor.club.graceDays),
}

/** members.manage: sign-ups waiting for approval. */
export const approvalCards: CardProvider = {
  capability: 'members.manage',
  cards: async ({ actor, standing }) => [await approvalCard(actor.club.id, standing.today)],
}
