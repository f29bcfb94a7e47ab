// Test data straight into the test database, with overrides. Dates are relative to today in the
// demo club's time zone, so the tests mean the same thing whatever day they run.
import { createHash, randomBytes, randomUUID } from 'node:crypto'
import { createPasswordHash } from '../../server/services/accounts/password-hashing'
import { sql } from './db'
import type { Role } from '../../shared/utils/permissions'
import { trainingExpiresOn } from '../../shared/utils/training-validity'

export const CLUB_TIME_ZONE = 'Europe/London'
export const FACTORY_PASSWORD = 'factory-password-123'

/**
 * Today (YYYY-MM-DD) in the demo club's time zone, optionally shifted by `days`. Worked out here with
 * Intl and UTC date arithmetic, not with the app's calendar helpers, so the dates tests expect do not
 * come from the code they test.
 */
export function clubDay(days = 0): string {
  // en-CA writes dates as YYYY-MM-DD.
  const today = new Intl.DateTimeFormat('en-CA', { timeZone: CLUB_TIME_ZONE, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date())
  const [y, m, d] = today.split('-').map(Number) as [number, number, number]
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10)
}

// Hashed once per test file with the server's parameters (a hash costs about a third of a second).
let hashed: Promise<string> | undefined
const passwordHash = () => (hashed ??= createPasswordHash().make(FACTORY_PASSWORD))

/** The demo club's id (in `db`, default the shared test database). */
export async function demoClubId(db?: string): Promise<string> {
  const [club] = await sql<{ id: string }>(`SELECT id FROM clubs WHERE tag_prefix = 'SRG'`, [], db)
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
  /** Exact column values; each wins over the day-based and yes/no overrides above. */
  paidThrough?: string | null
  approvedAt?: When | null
  suspendedAt?: When | null
  resignedAt?: When | null
  guardianConsentAt?: When | null
  emailVerifiedAt?: When | null
  noticeOptOuts?: string[]
  phone?: string | null
  unitPreference?: 'bar' | 'psi'
  /** A stored hash (default: FACTORY_PASSWORD hashed with the server's parameters); null = no password (an imported account). */
  passwordHash?: string | null
  /** Another database (a test with a server and database of its own); default the shared one. */
  db?: string
}

export interface MadeMember { userId: string, memberId: string, email: string, name: string, password: string }

/** Creates an account and a membership in the demo club; unique e-mail unless given. */
export async function makeMember(o: MemberOverrides = {}): Promise<MadeMember> {
  const clubId = o.clubId ?? await demoClubId(o.db)
  const tag = randomUUID().slice(0, 8)
  const name = o.name ?? `Test Member ${tag}`
  const { userId, email } = await makeUser({
    email: o.email ?? `member-${tag}@test.hoopwise.example`, name, passwordHash: o.passwordHash,
    emailVerifiedAt: o.emailVerifiedAt !== undefined ? o.emailVerifiedAt : o.verified === false ? null : NOW, db: o.db,
  })
  const pick = <T>(exact: T | undefined, fallback: T): T => (exact === undefined ? fallback : exact)
  const memberId = await insertRow('memberships', {
    clubId,
    userId,
    roles: ['member', ...(o.roles ?? []).filter(r => r !== 'member')],
    approvedAt: pick(o.approvedAt, o.approved === false ? null : NOW),
    paidThrough: pick(o.paidThrough, o.paidDays === null ? null : clubDay(o.paidDays ?? 180)),
    suspendedAt: pick(o.suspendedAt, o.suspendedReason ? NOW : null),
    suspendedReason: o.suspendedReason ?? null,
    resignedAt: pick(o.resignedAt, o.resigned ? NOW : null),
    birthDate: o.birthDate === undefined ? clubDay(-30 * 365) : o.birthDate,
    guardianName: o.guardianName ?? null,
    guardianEmail: o.guardianEmail ?? null,
    guardianConsentAt: pick(o.guardianConsentAt, o.guardianConsent ? NOW : null),
    noticeOptOuts: o.noticeOptOuts,
    phone: o.phone,
    unitPreference: o.unitPreference,
  }, o.db)
  if (o.acceptWaiver ?? true) await acceptWaiver({ memberId, typedName: name, db: o.db })
  return { userId, memberId, email, name, password: FACTORY_PASSWORD }
}

/**
 * A club of the test's own (same time zone as the demo club, no waiver yet), for tests whose writes
 * touch every member of a club (a new waiver version) or that need exact club-wide counts.
 */
export async function makeClub(o: { name?: string, graceDays?: number, tagPrefix?: string, timeZone?: string, publicUrl?: string, db?: string } = {}): Promise<{ id: string, name: string }> {
  const name = o.name ?? `Test Club ${randomUUID().slice(0, 8)}`
  const id = await insertRow('clubs', {
    name, tagPrefix: o.tagPrefix ?? 'TST', timeZone: o.timeZone ?? CLUB_TIME_ZONE,
    publicUrl: o.publicUrl ?? 'http://127.0.0.1', graceDays: o.graceDays ?? 30,
  }, o.db)
  return { id, name }
}

// ---------------------------------------------------------------------------------------------
// Every other record the tests create or put into a state, one factory or state helper per kind.
// Overrides are named like the columns (camelCase); timestamps take a Date, NOW, ago('7 days') or
// fromNow('1 hour') (the database's clock), so a test says "a week ago" instead of writing SQL.

/** A moment relative to the database's now(): `interval` after it, or before it when `before`. */
export interface Relative { interval: string, before?: boolean }
/** A timestamp override: a Date, or a moment relative to the database's clock. */
export type When = Date | Relative
/** The database's now(). */
export const NOW: Relative = { interval: '0 seconds' }
/** `interval` before the database's now(), e.g. ago('30 days 1 minute'). */
// Not '-7 days 1 minute': PostgreSQL signs each part of an interval on its own (-7 days +1 minute).
export const ago = (interval: string): Relative => ({ interval, before: true })
/** `interval` after the database's now(), e.g. fromNow('1 hour'). */
export const fromNow = (interval: string): Relative => ({ interval })

const isRelative = (v: unknown): v is Relative =>
  typeof v === 'object' && v !== null && !(v instanceof Date) && !Array.isArray(v) && typeof (v as Relative).interval === 'string'
const column = (key: string) => key.replace(/[A-Z]/g, c => `_${c.toLowerCase()}`)

/** `$n` (or `now() + $n::interval`) for `value`, pushing its parameter. */
function placeholder(value: unknown, params: unknown[]): string {
  params.push(isRelative(value) ? value.interval : value)
  if (!isRelative(value)) return `$${params.length}`
  return `now() ${value.before ? '-' : '+'} $${params.length}::interval`
}

/** Inserts one row (undefined values take the column default) and returns its id. */
async function insertRow(table: string, values: Record<string, unknown>, db?: string): Promise<string> {
  const params: unknown[] = []
  const entries = Object.entries(values).filter(([, v]) => v !== undefined)
  const [row] = await sql<{ id: string }>(`INSERT INTO ${table} (${entries.map(([k]) => column(k)).join(', ')})
    VALUES (${entries.map(([, v]) => placeholder(v, params)).join(', ')}) RETURNING id`, params, db)
  return row!.id
}

/** Which rows a state helper changes: one id, several ids, column values (a list = any of them), or 'all'. */
export type Where = string | string[] | Record<string, unknown> | 'all'

/** Sets `values` on the rows of `table` that `where` picks; returns the ids changed. */
async function updateRows(table: string, where: Where, values: object, db?: string): Promise<string[]> {
  const params: unknown[] = []
  const set = Object.entries(values).filter(([, v]) => v !== undefined)
    .map(([k, v]) => `${column(k)} = ${placeholder(v, params)}`)
  if (!set.length) throw new Error(`nothing to set on ${table}`)
  const filter = where === 'all' ? {} : typeof where === 'string' || Array.isArray(where) ? { id: where } : where
  const conditions = Object.entries(filter).map(([k, v]) =>
    Array.isArray(v) ? `${column(k)} = ANY(${placeholder(v, params)})` : `${column(k)} = ${placeholder(v, params)}`)
  const rows = await sql<{ id: string }>(`UPDATE ${table} SET ${set.join(', ')}
    ${conditions.length ? `WHERE ${conditions.join(' AND ')}` : ''} RETURNING id`, params, db)
  return rows.map(r => r.id)
}

export interface UserOverrides {
  email?: string
  name?: string
  /** Null: no password (an imported account that has not set one yet). */
  passwordHash?: string | null
  /** Default: confirmed now. */
  emailVerifiedAt?: When | null
  db?: string
}

/** An account without a membership; the password is FACTORY_PASSWORD unless a hash is given. */
export async function makeUser(o: UserOverrides = {}): Promise<{ userId: string, email: string, name: string, password: string }> {
  const tag = randomUUID().slice(0, 8)
  const email = o.email ?? `user-${tag}@test.hoopwise.example`
  const name = o.name ?? `Test User ${tag}`
  const userId = await insertRow('users', {
    email, name, passwordHash: o.passwordHash === null ? null : o.passwordHash ?? await passwordHash(),
    emailVerifiedAt: o.emailVerifiedAt === undefined ? NOW : o.emailVerifiedAt,
  }, o.db)
  return { userId, email, name, password: FACTORY_PASSWORD }
}

/** An account's state: `setUser(m.userId, { emailVerifiedAt: NOW })`. */
export function setUser(where: Where, o: { email?: string, name?: string, passwordHash?: string, emailVerifiedAt?: When | null }, db?: string) {
  return updateRows('users', where, o, db)
}

/** The membership columns a test may set (camelCase column names). */
export interface MembershipState {
  roles?: Role[]
  approvedAt?: When | null
  paidThrough?: string | null
  suspendedAt?: When | null
  suspendedReason?: string | null
  resignedAt?: When | null
  birthDate?: string | null
  guardianName?: string | null
  guardianEmail?: string | null
  guardianConsentAt?: When | null
  phone?: string | null
  unitPreference?: 'bar' | 'psi'
  noticeOptOuts?: string[]
  emergencyContactName?: string | null
  emergencyContactPhone?: string | null
}

/** A membership's state: `setMembership(m.memberId, { suspendedAt: ago('1 day') })`; returns the ids changed. */
export function setMembership(where: Where, o: MembershipState, db?: string) {
  return updateRows('memberships', where, o, db)
}

/** A waiver version of `clubId` (default the next version, published now); returns its id and version. */
export async function makeWaiver(o: { clubId: string, version?: number, title?: string, body?: string, publishedBy?: string, db?: string }): Promise<{ waiverId: string, version: number }> {
  const version = o.version ?? ((await sql<{ v: number }>('SELECT coalesce(max(version), 0)::int + 1 AS v FROM waivers WHERE club_id = $1', [o.clubId], o.db))[0]!.v)
  const waiverId = await insertRow('waivers', {
    clubId: o.clubId, version, title: o.title ?? `Test waiver v${version}`,
    body: o.body ?? 'Fills are remote. Eye protection at the pad. (test waiver)', publishedBy: o.publishedBy,
  }, o.db)
  return { waiverId, version }
}

/** The member's acceptance of a waiver (default: their club's newest version); null when the club has none. */
export async function acceptWaiver(o: { memberId: string, waiverId?: string, typedName?: string, acceptedAt?: When, db?: string }): Promise<{ acceptanceId: string } | null> {
  const [m] = await sql<{ club_id: string, name: string, waiver_id: string | null }>(`SELECT m.club_id, u.name,
      (SELECT id FROM waivers w WHERE w.club_id = m.club_id ORDER BY version DESC LIMIT 1) AS waiver_id
    FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1`, [o.memberId], o.db)
  const waiverId = o.waiverId ?? m!.waiver_id
  if (!waiverId) return null
  const acceptanceId = await insertRow('waiver_acceptances', {
    clubId: m!.club_id, waiverId, membershipId: o.memberId, typedName: o.typedName ?? m!.name, acceptedAt: o.acceptedAt,
  }, o.db)
  return { acceptanceId }
}

export type NoticeStatus = 'queued' | 'sending' | 'sent' | 'failed' | 'skipped'

/** The notice columns a test may set. */
export interface NoticeState {
  status?: NoticeStatus
  attempts?: number
  deferrals?: number
  lastError?: string | null
  nextAttemptAt?: When
  lockedUntil?: When | null
  claimId?: string | null
  sentAt?: When | null
}

export interface NoticeOverrides extends NoticeState {
  memberId: string
  /** Default 'dues_reminder'. */
  kind?: string
  subjectKey?: string
  /** Default today at the club. */
  dueOn?: string
  /** Default the member's e-mail. */
  toEmail?: string
  subject?: string
  textBody?: string
  htmlBody?: string
  db?: string
}

/** A notice for a member (queued, due today, unless overridden); returns its id. */
export async function makeNotice(o: NoticeOverrides): Promise<{ noticeId: string }> {
  const [m] = await sql<{ club_id: string, email: string }>(
    'SELECT m.club_id, u.email FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1', [o.memberId], o.db)
  const { memberId, db, kind, subjectKey, dueOn, toEmail, subject, textBody, htmlBody, ...state } = o
  const noticeId = await insertRow('notices', {
    clubId: m!.club_id, membershipId: memberId, kind: kind ?? 'dues_reminder', subjectKey: subjectKey ?? 'test',
    dueOn: dueOn ?? clubDay(0), toEmail: toEmail ?? m!.email, subject: subject ?? 'Test notice',
    textBody: textBody ?? 'Test notice', htmlBody: htmlBody ?? '<p>Test notice</p>', ...state,
  }, db)
  return { noticeId }
}

/** Notices' state: `setNotice(id, { status: 'failed', lastError: '550 …' })` or `setNotice({ membershipId }, …)`. */
export function setNotice(where: Where, o: NoticeState, db?: string) {
  return updateRows('notices', where, o, db)
}

/** The ids of a member's notices, oldest first. */
export async function noticesOf(memberId: string, db?: string): Promise<string[]> {
  return (await sql<{ id: string }>('SELECT id FROM notices WHERE membership_id = $1 ORDER BY created_at, id', [memberId], db)).map(r => r.id)
}

/** The stored hash of a one-time link's token (only hashes are kept). */
export const tokenHash = (token: string) => createHash('sha256').update(token).digest('hex')

/** A one-time link for an account (default: e-mail confirmation, valid for a day); returns its id and token. */
export async function makeActionToken(o: { userId: string, memberId?: string, purpose?: 'verify_email' | 'reset_password' | 'guardian_consent', token?: string, expiresAt?: When, usedAt?: When | null, db?: string }): Promise<{ tokenId: string, token: string }> {
  const token = o.token ?? randomBytes(32).toString('base64url')
  const tokenId = await insertRow('action_tokens', {
    userId: o.userId, membershipId: o.memberId, purpose: o.purpose ?? 'verify_email', tokenHash: tokenHash(token),
    expiresAt: o.expiresAt ?? fromNow('1 day'), usedAt: o.usedAt,
  }, o.db)
  return { tokenId, token }
}

/** One-time links' state, picked by id or by their token: `setActionToken({ token }, { expiresAt: ago('1 minute') })`. */
export function setActionToken(where: Where | { token: string }, o: { expiresAt?: When, usedAt?: When | null }, db?: string) {
  const picked = typeof where === 'object' && !Array.isArray(where) && 'token' in where ? { tokenHash: tokenHash(String(where.token)) } : where
  return updateRows('action_tokens', picked, o, db)
}

/** The session columns a test may set. */
export interface SessionState { createdAt?: When, lastSeenAt?: When, revokedAt?: When | null, revokeReason?: string | null }

/** A server-side session row for a member (no cookie: sign in for one); returns its id. */
export async function makeSession(o: SessionState & { userId: string, memberId: string, address?: string, userAgent?: string, db?: string }): Promise<{ sessionId: string }> {
  const { userId, memberId, address, userAgent, db, ...state } = o
  const sessionId = await insertRow('sessions', { userId, membershipId: memberId, address: address ?? '127.0.0.1', userAgent: userAgent ?? 'factory', ...state }, db)
  return { sessionId }
}

/** Sessions' state: `setSession(id, { lastSeenAt: ago('7 days 1 minute') })`; returns the ids changed. */
export function setSession(where: Where, o: SessionState, db?: string) {
  return updateRows('sessions', where, o, db)
}

export interface AuditOverrides {
  clubId?: string
  actorMemberId?: string | null
  actorName?: string | null
  action?: string
  subjectType?: string
  subjectId?: string | null
  before?: unknown
  after?: unknown
  reason?: string | null
  db?: string
}

/** An audit row (appended like the server does; the table refuses changes afterwards); returns its id. */
export async function makeAuditEvent(o: AuditOverrides = {}): Promise<{ auditId: string }> {
  const json = (v: unknown) => (v === undefined || v === null ? v : JSON.stringify(v))
  const auditId = await insertRow('audit_events', {
    clubId: o.clubId ?? await demoClubId(o.db),
    actorMembershipId: o.actorMemberId,
    // The name is kept only for actors without a membership (the system, a guardian).
    actorName: o.actorName !== undefined ? o.actorName : o.actorMemberId ? undefined : 'System',
    action: o.action ?? 'test.event', subjectType: o.subjectType ?? 'test', subjectId: o.subjectId,
    before: json(o.before), after: json(o.after), reason: o.reason,
  }, o.db)
  return { auditId }
}

/** A sign-in/sign-up/e-mail count as the rate limiter stores it; expires `expiresInMs` from now. */
export async function makeRateLimit(o: { key: string, points: number, expiresInMs?: number, db?: string }): Promise<{ key: string }> {
  await sql('INSERT INTO rate_limits (key, points, expire) VALUES ($1, $2, $3) ON CONFLICT (key) DO UPDATE SET points = $2, expire = $3',
    [o.key, o.points, Date.now() + (o.expiresInMs ?? 60 * 60 * 1000)], o.db)
  return { key: o.key }
}

// ---------------------------------------------------------------------------------------------
// Vessels, their proof tests and events (dates as YYYY-MM-DD, e.g. clubDay(-400) for a proof 400 days old).

export interface VesselOverrides {
  /** The owner's membership id. */
  ownerId: string
  name?: string
  construction?: 'single_bottle' | 'spliced_bottles' | 'overwrapped_liner' | 'mandrel_tube' | 'other'
  state?: 'awaiting_proof' | 'in_service' | 'quarantined' | 'failed' | 'retired'
  /** An e-glass laminate with this layup date (default: a laminate, undated, for laid-up constructions). */
  lastLayupOn?: string | null
  volumeL?: number
  db?: string
  metalInPressurePath?: boolean
}

/** A vessel owned by `ownerId`, in its owner's club, numbered from the club's counter; awaiting proof unless given. */
export async function makeVessel(o: VesselOverrides): Promise<{ vesselId: string, tag: string }> {
  const [m] = await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [o.ownerId], o.db)
  const [taken] = await sql<{ number: number, tag_prefix: string }>(
    `UPDATE clubs SET next_vessel_number = next_vessel_number + 1 WHERE id = $1
      RETURNING next_vessel_number - 1 AS number, tag_prefix`, [m!.club_id], o.db)
  const construction = o.construction ?? 'single_bottle'
  const laminate = o.lastLayupOn != null || construction === 'overwrapped_liner' || construction === 'mandrel_tube'
  const tag = `${taken!.tag_prefix}-${String(taken!.number).padStart(4, '0')}`
  const vesselId = await insertRow('vessels', {
    clubId: m!.club_id, ownerMembershipId: o.ownerId, number: taken!.number, tag, name: o.name ?? `Test vessel ${taken!.number}`,
    construction, volumeL: o.volumeL ?? 2, diameterMm: 102, state: o.state ?? 'awaiting_proof',
    ...(o.metalInPressurePath ? { metalInPressurePath: true } : {}),
    ...(laminate ? { fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3, lastLayupOn: o.lastLayupOn ?? null } : {}),
  }, o.db)
  return { vesselId, tag }
}

/** A recorded proof test (a pass at 15 bar with margin 1.5 unless given); the vessel's state is not changed. */
export async function makeProofTest(o: { vesselId: string, witnessId: string, testedOn: string, pressureBar?: number, result?: 'pass' | 'leak' | 'permanent_deformation' | 'burst', marginRatio?: number, gaugePhotoId?: string, db?: string }): Promise<{ proofTestId: string }> {
  const [v] = await sql<{ club_id: string }>('SELECT club_id FROM vessels WHERE id = $1', [o.vesselId], o.db)
  const result = o.result ?? 'pass'
  const pressureBar = o.pressureBar ?? 15
  const margin = o.marginRatio ?? 1.5
  const proofTestId = await insertRow('proof_tests', {
    clubId: v!.club_id, vesselId: o.vesselId, witnessMembershipId: o.witnessId, testedOn: o.testedOn, pressureBar, result,
    failureLocation: result === 'pass' ? null : 'wall', marginRatio: result === 'pass' ? margin : null,
    ratedFillBar: result === 'pass' ? Math.floor((pressureBar / margin) * 100) / 100 : null, gaugePhotoId: o.gaugePhotoId ?? null,
  }, o.db)
  return { proofTestId }
}

/**
 * A photo row (no file behind it: fetching its image finds none), for tests that need a photo to point
 * at, such as a proof test's gauge photo. Build and gauge photos name a vessel; a coupon photo names none. The club is the vessel's unless given, else the demo club.
 */
export async function makePhoto(o: { clubId?: string, uploadedBy: string, vesselId?: string | null, purpose?: 'build' | 'gauge' | 'coupon', caption?: string, db?: string }): Promise<{ photoId: string }> {
  const purpose = o.purpose ?? (o.vesselId ? 'build' : 'coupon')
  const [vessel] = o.vesselId ? await sql<{ club_id: string }>('SELECT club_id FROM vessels WHERE id = $1', [o.vesselId], o.db) : []
  const photoId = await insertRow('photos', {
    clubId: o.clubId ?? vessel?.club_id ?? await demoClubId(o.db), vesselId: o.vesselId ?? null, uploadedByMembershipId: o.uploadedBy, purpose,
    contentType: 'image/jpeg', byteSize: 1024, width: 640, height: 480, caption: o.caption,
  }, o.db)
  return { photoId }
}

// ---------------------------------------------------------------------------------------------
// Training (dates as YYYY-MM-DD, e.g. clubDay(-30) for a course taken a month ago).

/**
 * A training record of course `course` (its code, e.g. 'composite_ppe') for member `memberId`, trained
 * on `trainedOn` (default today), a pass unless given, expiring by the course's validity (the one rule,
 * trainingExpiresOn) unless `expiresOn` is given. The trainer and issuer are `trainerId`. `imported`:
 * brought in by a roster import and not confirmed yet (every eligibility rule ignores it).
 */
export async function makeTrainingRecord(o: { memberId: string, course: string, trainerId: string, trainedOn?: string, result?: 'pass' | 'fail', expiresOn?: string, takenElsewhere?: boolean, retrainingReason?: 'changed_workshop' | 'changed_ppe' | 'skill_not_retained', imported?: boolean, db?: string }): Promise<{ recordId: string, expiresOn: string }> {
  const [c] = await sql<{ id: string, club_id: string, name: string, validity_months: number, trainee: string, trainer: string }>(
    `SELECT c.id, c.club_id, c.name, c.validity_months, tu.name AS trainee, ru.name AS trainer
       FROM memberships m JOIN users tu ON tu.id = m.user_id JOIN courses c ON c.club_id = m.club_id AND c.code = $2
       JOIN memberships rm ON rm.id = $3 JOIN users ru ON ru.id = rm.user_id
      WHERE m.id = $1`, [o.memberId, o.course, o.trainerId], o.db)
  if (!c) throw new Error(`makeTrainingRecord: no course ${o.course} in the member's club`)
  const trainedOn = o.trainedOn ?? clubDay(0)
  const expiresOn = o.expiresOn ?? trainingExpiresOn(trainedOn, c.validity_months)
  const recordId = await insertRow('training_records', {
    clubId: c.club_id, membershipId: o.memberId, courseId: c.id, traineeName: c.trainee, subject: c.name,
    trainedFrom: trainedOn, trainedTo: trainedOn, trainerName: c.trainer, trainerMembershipId: o.trainerId,
    issuedByMembershipId: o.trainerId, result: o.result ?? 'pass', expiresOn, takenElsewhere: o.takenElsewhere ?? false,
    ...(o.retrainingReason ? { retrainingRequiredAt: NOW, retrainingReason: o.retrainingReason, retrainingFlaggedByMembershipId: o.trainerId } : {}),
    ...(o.imported ? { imported: true, confirmedAt: null } : {}),
  }, o.db)
  return { recordId, expiresOn }
}

/**
 * A training session of course `course` (its code) in the demo club (or `clubId`), run by
 * `instructorId`, starting `startsAt` (default in 7 days), with `capacity` places (default 5).
 */
export async function makeTrainingSession(o: { instructorId: string, course?: string, startsAt?: When, endsAt?: When, capacity?: number, place?: string, clubId?: string, db?: string }): Promise<{ sessionId: string, courseId: string }> {
  const clubId = o.clubId ?? await demoClubId(o.db)
  const [c] = await sql<{ id: string }>('SELECT id FROM courses WHERE club_id = $1 AND code = $2', [clubId, o.course ?? 'composite_ppe'], o.db)
  if (!c) throw new Error(`makeTrainingSession: no course ${o.course}`)
  const startsAt = o.startsAt ?? fromNow('7 days')
  // A session that started in the past is still running (it ends 3 hours from now); any other lasts 3 hours.
  const endsAt = o.endsAt ?? (isRelative(startsAt) ? (startsAt.before ? fromNow('3 hours') : fromNow(`${startsAt.interval} 10800 seconds`)) : new Date(startsAt.getTime() + 3 * 3600_000))
  const sessionId = await insertRow('training_sessions', {
    clubId, courseId: c.id, instructorMembershipId: o.instructorId, startsAt, endsAt, place: o.place ?? 'Test workshop', capacity: o.capacity ?? 5,
  }, o.db)
  return { sessionId, courseId: c.id }
}

/** A member's place in a session (enrolled unless given), as if they had enrolled; returns its id. */
export async function makeEnrolment(o: { sessionId: string, memberId: string, status?: 'enrolled' | 'waiting', db?: string }): Promise<{ enrolmentId: string }> {
  const [s] = await sql<{ club_id: string }>('SELECT club_id FROM training_sessions WHERE id = $1', [o.sessionId], o.db)
  const enrolmentId = await insertRow('training_enrolments', { clubId: s!.club_id, sessionId: o.sessionId, membershipId: o.memberId, status: o.status ?? 'enrolled' }, o.db)
  return { enrolmentId }
}

// ---------------------------------------------------------------------------------------------
// Workshop stations and bookings.

/** Opening hours open every day from `opens` to `closes` (wall clock, Monday first). */
export const openEveryDay = (opens = '00:00', closes = '24:00') => Array.from({ length: 7 }, () => ({ opens, closes }))

/** A workshop station of club `clubId` (default the demo club): open all day every day, no courses, 4 hours at most, unless overridden. */
export async function makeStation(o: { clubId?: string, name?: string, kind?: 'laminating_bench' | 'cure_rack_slot' | 'sanding_booth' | 'test_rig', requiredCourses?: string[], maxBookingMinutes?: number, openingHours?: ({ opens: string, closes: string } | null)[], adultsOnly?: boolean, position?: number, db?: string } = {}): Promise<{ stationId: string, name: string }> {
  const name = o.name ?? `Station ${randomUUID().slice(0, 8)}`
  const stationId = await insertRow('stations', {
    clubId: o.clubId ?? await demoClubId(o.db), name, kind: o.kind ?? 'laminating_bench', requiredCourses: o.requiredCourses ?? [],
    maxBookingMinutes: o.maxBookingMinutes ?? 240, openingHours: JSON.stringify(o.openingHours ?? openEveryDay()), adultsOnly: o.adultsOnly ?? false,
    position: o.position ?? 0,
  }, o.db)
  return { stationId, name }
}

/** A live booking of `stationId` by `memberId` from `startsAt` to `endsAt` (instants; a past one too), in the station's club. */
export async function makeBooking(o: { stationId: string, memberId: string, startsAt: When, endsAt: When, note?: string, db?: string }): Promise<{ bookingId: string }> {
  const [s] = await sql<{ club_id: string }>('SELECT club_id FROM stations WHERE id = $1', [o.stationId], o.db)
  if (!s) throw new Error('makeBooking: no such station')
  const bookingId = await insertRow('bookings', { clubId: s.club_id, stationId: o.stationId, membershipId: o.memberId, startsAt: o.startsAt, endsAt: o.endsAt, note: o.note ?? '' }, o.db)
  return { bookingId }
}

// ---------------------------------------------------------------------------------------------
// Pressure tiers, fill stations, launch events and fills.

/**
 * Member `memberId` holds tier `rank` (0–4), signed on `signedOn` (default today) and held since
 * `firstGrantedOn` (default the same day), expiring by the club's validity for the tier unless
 * `expiresOn` is given. With `assessorId` a grant sign-off is written too. `suspended`/`revoked`
 * mark it so, by `assessorId` (else the member's own id, which only a test would write). `imported`:
 * brought in by a roster import and not confirmed yet (every eligibility rule ignores it).
 */
export async function makeTier(o: { memberId: string, rank: number, signedOn?: string, firstGrantedOn?: string, expiresOn?: string, assessorId?: string, initial?: boolean, suspended?: boolean, revoked?: boolean, imported?: boolean, db?: string }): Promise<{ memberTierId: string, expiresOn: string }> {
  const [t] = await sql<{ club_id: string, validity_months: number }>(
    `SELECT m.club_id, l.validity_months FROM memberships m JOIN tier_levels l ON l.club_id = m.club_id AND l.rank = $2 WHERE m.id = $1`,
    [o.memberId, o.rank], o.db)
  if (!t) throw new Error(`makeTier: no member ${o.memberId} or no tier ${o.rank} in their club`)
  const signedOn = o.signedOn ?? clubDay(0)
  const expiresOn = o.expiresOn ?? trainingExpiresOn(signedOn, t.validity_months)
  const by = o.assessorId ?? o.memberId
  const memberTierId = await insertRow('member_tiers', {
    clubId: t.club_id, membershipId: o.memberId, rank: o.rank, firstGrantedOn: o.firstGrantedOn ?? signedOn, signedOn, expiresOn,
    initial: o.initial ?? false,
    ...(o.suspended ? { suspendedAt: NOW, suspensionReason: 'Suspended in a test', suspendedByMembershipId: by } : {}),
    ...(o.revoked ? { revokedAt: NOW, revocationReason: 'Revoked in a test', revokedByMembershipId: by } : {}),
    ...(o.imported ? { imported: true, confirmedAt: null, importedAssessorName: 'Assessor Named In The Import' } : {}),
  }, o.db)
  if (o.assessorId || o.initial) {
    await insertRow('tier_signoffs', {
      clubId: t.club_id, memberTierId, membershipId: o.memberId, rank: o.rank, kind: o.initial ? 'initial' : 'grant', signedOn, expiresOn,
      assessorMembershipId: o.initial ? null : o.assessorId, notes: '',
    }, o.db)
  }
  return { memberTierId, expiresOn }
}

/**
 * A fill station of club `clubId` (default the demo club) whose lowest rated part is rated
 * `lowestPartRatingBar` (default 75 bar: 25 bar to launch at with the factor 3), its gauge calibrated
 * `gaugeCalibratedOn` (default 30 days ago) every `gaugeIntervalMonths` (default 12).
 */
export async function makeFillStation(o: { clubId?: string, name?: string, lowestPartRatingBar?: number, gaugeCalibratedOn?: string, gaugeIntervalMonths?: number, db?: string } = {}): Promise<{ stationId: string, name: string }> {
  const name = o.name ?? `Launcher ${randomUUID().slice(0, 8)}`
  const stationId = await insertRow('fill_stations', {
    clubId: o.clubId ?? await demoClubId(o.db), name, lowestPartRatingBar: o.lowestPartRatingBar ?? 75, gaugeName: `Gauge of ${name}`,
    gaugeCalibratedOn: o.gaugeCalibratedOn ?? clubDay(-30), gaugeIntervalMonths: o.gaugeIntervalMonths ?? 12,
  }, o.db)
  return { stationId, name }
}

/**
 * A launch event of `createdBy`'s club on `heldOn` (default today) with a pressure cap (default 25 bar),
 * using `stationIds`, staffed by `staffIds`, and `registeredIds` registered.
 */
export async function makeLaunchEvent(o: { createdBy: string, heldOn?: string, site?: string, pressureCapBar?: number, competition?: boolean, stationIds?: string[], staffIds?: string[], registeredIds?: string[], cancelled?: boolean, db?: string }): Promise<{ eventId: string }> {
  const [m] = await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [o.createdBy], o.db)
  const clubId = m!.club_id
  const eventId = await insertRow('launch_events', {
    clubId, heldOn: o.heldOn ?? clubDay(0), site: o.site ?? 'North flat', pressureCapBar: o.pressureCapBar ?? 25, competition: o.competition ?? false,
    createdByMembershipId: o.createdBy, ...(o.cancelled ? { cancelledAt: NOW, cancelReason: 'Cancelled in a test' } : {}),
  }, o.db)
  for (const stationId of o.stationIds ?? []) await sql('INSERT INTO launch_event_stations (event_id, club_id, station_id) VALUES ($1, $2, $3)', [eventId, clubId, stationId], o.db)
  for (const id of o.staffIds ?? []) await sql('INSERT INTO launch_event_staff (event_id, club_id, membership_id) VALUES ($1, $2, $3)', [eventId, clubId, id], o.db)
  for (const id of o.registeredIds ?? []) await sql('INSERT INTO launch_event_registrations (event_id, club_id, membership_id) VALUES ($1, $2, $3)', [eventId, clubId, id], o.db)
  return { eventId }
}

/**
 * A fill in the log, straight into the table (no gate): `memberId` filled `vesselId` at `eventId` on
 * `stationId` to `pressureBar` (default 5), recorded by `recordedBy` (default the member), supervised
 * by `supervisorId` (then also its recorder); allowed unless `reasons` are given. Made at `tierRank`
 * (default the member's highest tier in force on the event's day).
 */
export async function makeFill(o: { eventId: string, stationId: string, memberId: string, vesselId: string, recordedBy?: string, supervisorId?: string, pressureBar?: number, waterVolumeL?: number, reasons?: { code: string, message: string }[], tierRank?: number | null, db?: string }): Promise<{ fillId: string }> {
  const [e] = await sql<{ club_id: string, held_on: string, rank: number | null }>(
    `SELECT e.club_id, e.held_on::text, (SELECT max(t.rank) FROM member_tiers t WHERE t.membership_id = $2 AND t.first_granted_on <= e.held_on AND t.expires_on >= e.held_on AND t.revoked_at IS NULL AND t.confirmed_at IS NOT NULL) AS rank FROM launch_events e WHERE e.id = $1`,
    [o.eventId, o.memberId], o.db)
  if (!e) throw new Error('makeFill: no such event')
  const pressureBar = o.pressureBar ?? 5
  const reasons = o.reasons ?? []
  const fillId = await insertRow('fills', {
    clubId: e.club_id, eventId: o.eventId, heldOn: e.held_on, stationId: o.stationId, membershipId: o.memberId, vesselId: o.vesselId,
    recordedByMembershipId: o.supervisorId ?? o.recordedBy ?? o.memberId, supervisorMembershipId: o.supervisorId ?? null,
    pressureBar, enteredPressure: pressureBar, enteredUnit: 'bar', waterVolumeL: o.waterVolumeL ?? 0.5,
    allowed: reasons.length === 0, permittedMaxBar: 25, limitingFactor: 'TIER', reasons: JSON.stringify(reasons),
    storedEnergyJ: 1000, tntEquivalentKg: 0.0002, minimumDistanceM: 5, tierRank: o.tierRank === undefined ? e.rank : o.tierRank,
  }, o.db)
  return { fillId }
}

/**
 * A fill pass of `memberId` issued `issuedAt` (default now) expiring `expiresAt` (default in 12 months),
 * replaced `replacedAt` (default live). Its token comes from the test through the pure signing functions.
 */
export async function makeFillPass(o: { memberId: string, issuedAt?: When, expiresAt?: When, replacedAt?: When | null, db?: string }): Promise<{ passId: string }> {
  const [m] = await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [o.memberId], o.db)
  if (!m) throw new Error('makeFillPass: no such member')
  const passId = await insertRow('fill_passes', {
    clubId: m.club_id, membershipId: o.memberId, issuedAt: o.issuedAt ?? ago('1 day'), expiresAt: o.expiresAt ?? fromNow('12 months'),
    replacedAt: o.replacedAt ?? undefined,
  }, o.db)
  return { passId }
}

// ---------------------------------------------------------------------------------------------
// Incidents.

/**
 * An incident of `reportedBy`'s club (default a near miss an hour ago, open), linked to `vesselId`,
 * `eventId` and the members `peopleIds` when given; straight into the tables (no quarantine).
 */
export async function makeIncident(o: { reportedBy: string, kind?: 'burst' | 'uncommanded_launch' | 'injury' | 'near_miss' | 'other', vesselId?: string, eventId?: string, peopleIds?: string[], injuryDetails?: string, closed?: boolean, happenedAt?: When, whatHappened?: string, db?: string }): Promise<{ incidentId: string }> {
  const [m] = await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [o.reportedBy], o.db)
  const clubId = m!.club_id
  const incidentId = await insertRow('incidents', {
    clubId, reportedByMembershipId: o.reportedBy, kind: o.kind ?? 'near_miss', happenedAt: o.happenedAt ?? ago('1 hour'), place: 'North flat',
    eventId: o.eventId ?? null, vesselId: o.vesselId ?? null, whatHappened: o.whatHappened ?? 'Made in a test', injuryDetails: o.injuryDetails ?? null,
    ...(o.closed ? { status: 'closed', closedAt: NOW, closedByMembershipId: o.reportedBy } : {}),
  }, o.db)
  for (const id of o.peopleIds ?? []) await sql('INSERT INTO incident_people (incident_id, club_id, membership_id) VALUES ($1, $2, $3)', [incidentId, clubId, id], o.db)
  return { incidentId }
}

/**
 * A paid card payment of `memberId` on their club's first plan, paid today, with the payment service's
 * customer `customerId` when given (a customer of the payment fake, say); returns its id.
 */
export async function makePayment(o: { memberId: string, customerId?: string, reference?: string, db?: string }): Promise<{ paymentId: string }> {
  const [p] = await sql<{ club_id: string, plan_id: string, name: string, price_minor: number, currency: string, period_months: number, receipt: number }>(
    `WITH r AS (UPDATE clubs SET next_receipt_number = next_receipt_number + 1
                 WHERE id = (SELECT club_id FROM memberships WHERE id = $1) RETURNING id, next_receipt_number - 1 AS receipt)
     SELECT r.id AS club_id, d.id AS plan_id, d.name, d.price_minor, d.currency, d.period_months, r.receipt
       FROM r JOIN dues_plans d ON d.club_id = r.id ORDER BY d.code LIMIT 1`, [o.memberId], o.db)
  const paymentId = await insertRow('payments', {
    clubId: p!.club_id, membershipId: o.memberId, planId: p!.plan_id, planName: p!.name, method: 'card', status: 'paid',
    amountMinor: p!.price_minor, currency: p!.currency, periodMonths: p!.period_months, paidOn: clubDay(0),
    paidThroughAfter: clubDay(365), receiptNumber: p!.receipt, reference: o.reference ?? null, providerCustomerId: o.customerId ?? null,
    providerCheckoutId: `cs_test_${randomBytes(8).toString('hex')}`, providerPaymentIntentId: `pi_${randomBytes(8).toString('hex')}`,
  }, o.db)
  return { paymentId }
}
