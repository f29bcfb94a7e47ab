import { QueryTypes } from 'sequelize'
import { actorCan, type Actor } from '../utils/auth'
import { loadStanding } from './standing'
import { statusCountColumnsSql, statusPredicates } from './membership-status-sql'
import { MEMBERSHIP_STATUSES, MEMBERSHIP_STATUS_LABELS, type MembershipStatus } from '../../shared/utils/membership-status'
import type { DashboardDto, StandingDto } from '../../shared/types/dto'

type Card = DashboardDto['cards'][number]

// The status function as SQL (its one copy), with this file's replacements.
const STATUS_PARAMS = { today: ':today', graceDays: ':graceDays' }
const STATUS_COUNTS_SQL = statusCountColumnsSql(STATUS_PARAMS)
const STATUS_SQL = statusPredicates(STATUS_PARAMS)

const STATUS_HINTS: Record<MembershipStatus, string> = {
  pending: 'Signed up, first dues not paid yet.',
  active: 'Dues paid through today or later.',
  grace: 'Dues ran out lately: can train, cannot fill or book.',
  lapsed: 'Past the grace period: must renew.',
  suspended: 'Suspended by the admin.',
  resigned: 'Left the club.',
}

const days = (n: number) => `${n} day${n === 1 ? '' : 's'}`

async function count(sql: string, replacements: Record<string, unknown>): Promise<number> {
  const [row] = await useDb().query<{ n: number }>(sql, { replacements, type: QueryTypes.SELECT })
  return row?.n ?? 0
}

/** Cards every member gets: their own status, waiver and paid-through date. */
function myCards(s: StandingDto): Card[] {
  const m = s.member
  const dues: Card = m.paidThrough
    ? { key: 'my-paid-through', title: 'Dues paid through', value: m.paidThrough, hint: s.daysToExpiry! >= 0 ? `${days(s.daysToExpiry!)} left.` : `Ran out ${days(-s.daysToExpiry!)} ago.`, to: '/standing', tone: s.daysToExpiry! > 30 ? 'ok' : 'attention', group: 'mine' }
    : { key: 'my-paid-through', title: 'Dues paid through', value: 'Never paid', hint: 'Your first dues make you an active member.', to: '/standing', tone: 'attention', group: 'mine' }
  return [
    { key: 'my-status', title: 'Status', value: MEMBERSHIP_STATUS_LABELS[m.status], hint: STATUS_HINTS[m.status], to: '/standing', tone: m.status === 'active' ? 'ok' : 'attention', group: 'mine' },
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
    title: MEMBERSHIP_STATUS_LABELS[status],
    value: byStatus.get(status) ?? 0,
    hint: STATUS_HINTS[status],
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

/** notices.manage: queued and failed e-mails. */
async function noticeCards(clubId: string): Promise<Card[]> {
  const rows = await useDb().query<{ status: string, n: number }>(`
    SELECT status, count(*)::int AS n FROM notices WHERE club_id = :clubId AND status IN ('queued', 'sending', 'failed')
    GROUP BY status`, { replacements: { clubId }, type: QueryTypes.SELECT })
  const n = (s: string) => rows.find(r => r.status === s)?.n ?? 0
  const waiting = n('queued') + n('sending')
  return [
    { key: 'notices-queued', title: 'E-mails waiting to go', value: waiting, hint: 'Queued notices the next run sends.', to: '/outbox?status=queued', tone: 'neutral', group: 'office' },
    { key: 'notices-failed', title: 'E-mails that failed', value: n('failed'), hint: n('failed') ? 'Check the address or the mail server.' : 'None failed.', to: '/outbox?status=failed', tone: n('failed') ? 'attention' : 'ok', group: 'office' },
  ]
}

/** policy.edit: the current waiver version and dues-current members who have not accepted it. */
async function waiverCards(clubId: string, today: string, graceDays: number, currentVersion: number | null): Promise<Card[]> {
  const missing = currentVersion === null
    ? 0
    : await count(`
      SELECT count(*)::int AS n FROM memberships m
      WHERE m.club_id = :clubId AND ((${STATUS_SQL.active}) OR (${STATUS_SQL.grace}))
        AND NOT EXISTS (SELECT 1 FROM waiver_acceptances a JOIN waivers w ON w.id = a.waiver_id
          WHERE a.membership_id = m.id AND w.club_id = :clubId AND w.version = :version)`,
      { clubId, today, graceDays, version: currentVersion })
  return [
    { key: 'waiver-version', title: 'Waiver in force', value: currentVersion === null ? 'None' : `Version ${currentVersion}`, hint: currentVersion === null ? 'Publish the club\'s waiver.' : 'Publishing a new version asks everyone again.', to: '/waiver', tone: currentVersion === null ? 'attention' : 'neutral', group: 'safety' },
    { key: 'waiver-missing', title: 'Members without the current waiver', value: missing, hint: 'Active and in-grace members who have not accepted it.', to: '/waiver', tone: missing ? 'attention' : 'ok', group: 'safety' },
  ]
}

/** audit.read: how many audit events the last 7 days brought. */
async function auditCard(clubId: string): Promise<Card> {
  const n = await count(`SELECT count(*)::int AS n FROM audit_events
    WHERE club_id = :clubId AND created_at > now() - interval '7 days'`, { clubId })
  return { key: 'audit-week', title: 'Audit events this week', value: n, hint: 'Privileged changes in the last 7 days.', to: '/audit', tone: 'neutral', group: 'audit' }
}

/** The dashboard for the signed-in member: their own cards, then one set per capability they hold. */
export async function loadDashboard(actor: Actor): Promise<DashboardDto | null> {
  const standing = await loadStanding(actor)
  if (!standing) return null
  const clubId = actor.club.id
  const { graceDays } = actor.club
  const { today } = standing
  // The capability cards' queries are independent: run them side by side on the pool.
  const groups = await Promise.all([
    actorCan(actor, 'members.read') ? memberCards(clubId, today, graceDays) : [],
    actorCan(actor, 'members.manage') ? approvalCard(clubId, today).then(c => [c]) : [],
    actorCan(actor, 'notices.manage') ? noticeCards(clubId) : [],
    actorCan(actor, 'policy.edit') ? waiverCards(clubId, today, graceDays, standing.member.waiver.currentVersion) : [],
    actorCan(actor, 'audit.read') ? auditCard(clubId).then(c => [c]) : [],
  ])
  const cards = [...myCards(standing), ...groups.flat()]
  return { roles: actor.roles, cards }
}
