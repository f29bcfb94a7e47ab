import { createHash, randomBytes } from 'node:crypto'
import { QueryTypes, type Transaction } from 'sequelize'
import type { TokenPurpose } from '../../models/ActionToken'

/** How long each kind of e-mailed link stays usable, in hours. */
export const TOKEN_LIFETIME_HOURS: Record<TokenPurpose, number> = {
  verify_email: 48,
  reset_password: 1,
  guardian_consent: 14 * 24,
}

/**
 * How long the welcome link of an imported account stays usable, in hours: a reset link by another
 * name (purpose reset_password), but a member may take days to open the club's first e-mail.
 */
export const WELCOME_LINK_HOURS = 14 * 24

/** A link lifetime in words for e-mails and messages: "1 hour", "48 hours", "14 days" (days only beyond two). */
export function lifetimeWords(hours: number): string {
  if (hours > 48 && hours % 24 === 0) return `${hours / 24} days`
  return hours === 1 ? '1 hour' : `${hours} hours`
}

/** How long a link of `purpose` stays usable, in words (see TOKEN_LIFETIME_HOURS). */
export function tokenLifetimeWords(purpose: TokenPurpose): string {
  return lifetimeWords(TOKEN_LIFETIME_HOURS[purpose])
}

export interface IssuedToken {
  id: string
  /**
   * The secret that goes into the e-mailed link. action_tokens keeps only its SHA-256; the queued
   * notice's bodies hold the link until the notice is sent, skipped or fails for good, when the
   * queue blanks it (services/notices/notices.ts, scrubLinksSql).
   */
  token: string
  expiresAt: Date
}

export interface TokenRow {
  id: string
  userId: string
  membershipId: string | null
  purpose: TokenPurpose
  expiresAt: Date
  usedAt: Date | null
}

const TOKEN_COLUMNS = 'id, user_id AS "userId", membership_id AS "membershipId", purpose, expires_at AS "expiresAt", used_at AS "usedAt"'

/** SHA-256 (hex) of a link token: the form in which action_tokens stores it (see IssuedToken.token). */
export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex')
}

/**
 * Creates a one-time token for `purpose` (32 random bytes, base64url) and stores its hash; it lasts
 * the purpose's lifetime unless `hours` says otherwise (the welcome link).
 */
export async function issueToken(
  input: { userId: string, membershipId?: string | null, purpose: TokenPurpose, hours?: number },
  transaction?: Transaction,
): Promise<IssuedToken> {
  const token = randomBytes(32).toString('base64url')
  const [row] = await useDb().query<{ id: string, expiresAt: Date }>(`
    INSERT INTO action_tokens (user_id, membership_id, purpose, token_hash, expires_at)
    VALUES (:userId, :membershipId, :purpose, :hash, now() + make_interval(hours => :hours))
    RETURNING id, expires_at AS "expiresAt"`, {
    replacements: {
      userId: input.userId,
      membershipId: input.membershipId ?? null,
      purpose: input.purpose,
      hash: hashToken(token),
      hours: input.hours ?? TOKEN_LIFETIME_HOURS[input.purpose],
    },
    type: QueryTypes.SELECT,
    transaction,
  })
  return { id: row!.id, token, expiresAt: new Date(row!.expiresAt) }
}

/** 422 with the reason a token of `purpose` cannot be used: unknown, already used, or expired. */
function refuseToken(row: TokenRow | undefined): never {
  if (!row) refuse({ code: 'TOKEN_INVALID', message: 'This link is not valid. Ask for a new one.' })
  if (row.usedAt) refuse({ code: 'TOKEN_USED', message: 'This link has already been used. Each link works once.' })
  refuse({ code: 'TOKEN_EXPIRED', message: 'This link has expired. Ask for a new one.' })
}

/** The token row for `token` and `purpose` if it is still usable; 422 (TOKEN_INVALID/USED/EXPIRED) otherwise. Does not consume it. */
export async function peekToken(token: string, purpose: TokenPurpose, transaction?: Transaction): Promise<TokenRow> {
  const [row] = await useDb().query<TokenRow & { expired: boolean }>(
    `SELECT ${TOKEN_COLUMNS}, expires_at <= now() AS expired FROM action_tokens WHERE token_hash = :hash AND purpose = :purpose`,
    { replacements: { hash: hashToken(token), purpose }, type: QueryTypes.SELECT, transaction })
  if (!row || row.usedAt || row.expired) refuseToken(row)
  return row
}

/**
 * Uses `token` for `purpose` exactly once: one conditional UPDATE marks it used only while it is
 * unused and unexpired, so two requests racing with the same link cannot both succeed.
 * 422 TOKEN_INVALID / TOKEN_USED / TOKEN_EXPIRED when it cannot be used.
 */
export async function consumeToken(token: string, purpose: TokenPurpose, transaction?: Transaction): Promise<TokenRow> {
  const hash = hashToken(token)
  const [row] = await useDb().query<TokenRow>(`
    UPDATE action_tokens SET used_at = now(), updated_at = now()
    WHERE token_hash = :hash AND purpose = :purpose AND used_at IS NULL AND expires_at > now()
    RETURNING ${TOKEN_COLUMNS}`, { replacements: { hash, purpose }, type: QueryTypes.SELECT, transaction })
  if (row) return row
  const [found] = await useDb().query<TokenRow>(
    `SELECT ${TOKEN_COLUMNS} FROM action_tokens WHERE token_hash = :hash AND purpose = :purpose`,
    { replacements: { hash, purpose }, type: QueryTypes.SELECT, transaction })
  refuseToken(found)
}

/** Marks every outstanding token of `purpose` for `userId` used, so older links stop working. */
export async function revokeTokens(userId: string, purpose: TokenPurpose, transaction?: Transaction): Promise<number> {
  const rows = await useDb().query<{ id: string }>(`
    UPDATE action_tokens SET used_at = now(), updated_at = now()
    WHERE user_id = :userId AND purpose = :purpose AND used_at IS NULL AND expires_at > now()
    RETURNING id`, { replacements: { userId, purpose }, type: QueryTypes.SELECT, transaction })
  return rows.length
}

/** How many tokens of `purpose` were issued for `userId` in the last `minutes` (to damp repeated requests). */
export async function recentTokenCount(userId: string, purpose: TokenPurpose, minutes: number, transaction?: Transaction): Promise<number> {
  const [row] = await useDb().query<{ n: number }>(`
    SELECT count(*)::int AS n FROM action_tokens
    WHERE user_id = :userId AND purpose = :purpose AND created_at > now() - make_interval(mins => :minutes)`,
  { replacements: { userId, purpose, minutes }, type: QueryTypes.SELECT, transaction })
  return row?.n ?? 0
}
