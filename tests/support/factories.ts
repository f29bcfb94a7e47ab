// Test data straight into the test database, with overrides. Dates are relative to today in the
// demo club's time zone, so the tests mean the same thing whatever day they run.
import { randomUUID } from 'node:crypto'
import { createPasswordHash } from '../../server/services/accounts/password-hashing'
import { sql } from './db'
import { addCalendarDays, dateInZone } from '../../shared/utils/dates'
import type { Role } from '../../shared/utils/permissions'

export const CLUB_TIME_ZONE = 'Europe/London'
export const FACTORY_PASSWORD = 'factory-password-123'

/** Today (YYYY-MM-DD) in the demo club's time zone, optionally shifted by `days`. */
export function clubDay(days = 0): string {
  return addCalendarDays(dateInZone(new Date(), CLUB_TIME_ZONE), days)
}

// Hashed once per test file with the server's parameters (a hash costs about a third of a second).
let hashed: Promise<string> | undefined
const passwordHash = () => (hashed ??= createPasswordHash().make(FACTORY_PASSWORD))

export async function demoClubId(): Promise<string> {
  const [club] = await sql<{ id: string }>(`SELECT id FROM clubs WHERE tag_prefix = 'SRG'`)
  return club!.id
}

export interface MemberOverrides {
  name?: string
  email?: string
  roles?: Role[]
  /** Paid-through as days from today (null = never paid). Default: 180 days ahead. */
  paidDays?: number | null
  approved?: boolean
  suspendedReason?: string | null
  resigned?: boolean
  birthDate?: string | null
  guardianName?: string | null
  guardianEmail?: string | null
  guardianConsent?: boolean
  verified?: boolean
  acceptWaiver?: boolean
  /** The club to join; default the demo club (see makeClub for a club of the test's own). */
  clubId?: string
}

export interface MadeMember { userId: string, memberId: string, email: string, name: string, password: string }

/** Creates an account and a membership in the demo club; unique e-mail unless given. */
export async function makeMember(o: MemberOverrides = {}): Promise<MadeMember> {
  const clubId = o.clubId ?? await demoClubId()
  const tag = randomUUID().slice(0, 8)
  const email = o.email ?? `member-${tag}@test.hoopwise.example`
  const name = o.name ?? `Test Member ${tag}`
  const [user] = await sql<{ id: string }>(
    `INSERT INTO users (email, name, password_hash, email_verified_at) VALUES ($1, $2, $3, $4) RETURNING id`,
    [email, name, await passwordHash(), o.verified === false ? null : new Date()])
  const paidThrough = o.paidDays === null ? null : clubDay(o.paidDays ?? 180)
  const [m] = await sql<{ id: string }>(
    `INSERT INTO memberships (club_id, user_id, roles, approved_at, paid_through, suspended_at, suspended_reason, resigned_at,
       birth_date, guardian_name, guardian_email, guardian_consent_at)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12) RETURNING id`,
    [clubId, user!.id, ['member', ...(o.roles ?? []).filter(r => r !== 'member')], o.approved === false ? null : new Date(),
      paidThrough, o.suspendedReason ? new Date() : null, o.suspendedReason ?? null, o.resigned ? new Date() : null,
      o.birthDate === undefined ? clubDay(-30 * 365) : o.birthDate, o.guardianName ?? null, o.guardianEmail ?? null,
      o.guardianConsent ? new Date() : null])
  if (o.acceptWaiver ?? true) {
    await sql(`INSERT INTO waiver_acceptances (club_id, waiver_id, membership_id, typed_name)
      SELECT $1, id, $2, $3 FROM waivers WHERE club_id = $1 ORDER BY version DESC LIMIT 1`, [clubId, m!.id, name])
  }
  return { userId: user!.id, memberId: m!.id, email, name, password: FACTORY_PASSWORD }
}

/**
 * A club of the test's own (same time zone as the demo club, no waiver yet), for tests whose writes
 * touch every member of a club (a new waiver version) or that need exact club-wide counts.
 */
export async function makeClub(o: { name?: string, graceDays?: number } = {}): Promise<{ id: string, name: string }> {
  const name = o.name ?? `Test Club ${randomUUID().slice(0, 8)}`
  const [club] = await sql<{ id: string }>(
    `INSERT INTO clubs (name, tag_prefix, time_zone, public_url, grace_days) VALUES ($1, 'TST', $2, 'http://127.0.0.1', $3) RETURNING id`,
    [name, CLUB_TIME_ZONE, o.graceDays ?? 30])
  return { id: club!.id, name }
}
