import { QueryTypes } from 'sequelize'
import QRCode from 'qrcode'
import type { Actor } from '../../utils/auth'
import { clubBaseUrl, clubToday } from '../clubs'
import { deriveFillPassKey, fillPassToken, readFillPassToken } from './fill-pass-token'
import type { FillPassDto, FillPassMemberDto, FillPassVerifyDto } from '#shared/types/fill-passes'
import { membershipStatus } from '#shared/utils/membership-status'
import { tierCode, tierState, type TierRank } from '#shared/utils/tier-rules'

/** How long a fill pass is valid: 12 months from issue. */
export const FILL_PASS_VALIDITY = '12 months'

/** The QR code of a fill pass: error correction M, like the vessel labels, with a quiet zone of 2 modules. */
export const FILL_PASS_QR_OPTIONS = { type: 'svg', errorCorrectionLevel: 'M', margin: 2 } as const

let key: string | undefined
/** The fill-pass signing key (from the session secret in runtimeConfig). */
function passKey(): string {
  return (key ??= deriveFillPassKey(useRuntimeConfig().session.password))
}

/** The verify address of pass `passId` on the club's public address, never the one a request came in on. */
export function fillPassUrl(club: { publicUrl: string }, passId: string): string {
  return `${clubBaseUrl(club)}/verify/${fillPassToken(passKey(), passId)}`
}

interface PassRow { id: string, issued_at: Date, expires_at: Date }

async function passDto(actor: Actor, row: PassRow): Promise<FillPassDto> {
  const verifyUrl = fillPassUrl(actor.club, row.id)
  return {
    verifyUrl,
    issuedAt: row.issued_at.toISOString(),
    expiresAt: row.expires_at.toISOString(),
    qrSvg: await QRCode.toString(verifyUrl, FILL_PASS_QR_OPTIONS),
  }
}

/**
 * The actor's live fill pass, issuing one when there is none (or the live one has expired: it is
 * replaced). The unique index on live passes keeps two tabs from issuing two.
 */
export async function myFillPass(actor: Actor): Promise<FillPassDto> {
  const replacements = { club: actor.club.id, member: actor.membership.id }
  const row = await inTransaction(async (transaction) => {
    await useDb().query(`UPDATE fill_passes SET replaced_at = now()
      WHERE membership_id = :member AND replaced_at IS NULL AND expires_at <= now()`, { replacements, transaction })
    await useDb().query(`INSERT INTO fill_passes (club_id, membership_id, expires_at)
      VALUES (:club, :member, now() + interval '${FILL_PASS_VALIDITY}')
      ON CONFLICT (membership_id) WHERE replaced_at IS NULL DO NOTHING`, { replacements, transaction })
    const [live] = await useDb().query<PassRow>(`SELECT id, issued_at, expires_at FROM fill_passes
      WHERE membership_id = :member AND replaced_at IS NULL`, { replacements, type: QueryTypes.SELECT, transaction })
    return live!
  })
  return passDto(actor, row)
}

/** Issues the actor a new fill pass: the old one is replaced and stops working at once. */
export async function renewFillPass(actor: Actor): Promise<FillPassDto> {
  const replacements = { club: actor.club.id, member: actor.membership.id }
  const row = await inTransaction(async (transaction) => {
    await useDb().query('UPDATE fill_passes SET replaced_at = now() WHERE membership_id = :member AND replaced_at IS NULL',
      { replacements, transaction })
    const [made] = await useDb().query<PassRow>(`INSERT INTO fill_passes (club_id, membership_id, expires_at)
      VALUES (:club, :member, now() + interval '${FILL_PASS_VALIDITY}') RETURNING id, issued_at, expires_at`,
    { replacements, type: QueryTypes.SELECT, transaction })
    return made!
  })
  return passDto(actor, row)
}

/** Why a fill pass is refused: no such pass (forged or malformed), replaced by a newer one, or expired. */
export type FillPassRefusal = 'unknown' | 'replaced' | 'expired'

interface ReadRow {
  membership_id: string
  club_id: string
  expired: boolean
  replaced: boolean
  name: string
  paid_through: string | null
  suspended_at: Date | null
  resigned_at: Date | null
  time_zone: string
  grace_days: number
  tiers: { rank: TierRank, name: string, expiresOn: string, suspended: boolean, revoked: boolean }[]
}

/** The pass behind `token` with its member and their tiers, in one round trip; a refusal otherwise. */
async function readPass(token: string, clubId?: string): Promise<ReadRow | FillPassRefusal> {
  const passId = readFillPassToken(passKey(), token)
  if (!passId) return 'unknown'
  const [row] = await useDb().query<ReadRow>(
    `SELECT p.membership_id, p.club_id, p.expires_at <= now() AS expired, p.replaced_at IS NOT NULL AS replaced,
            u.name, m.paid_through::text, m.suspended_at, m.resigned_at, c.time_zone, c.grace_days,
            COALESCE((SELECT json_agg(json_build_object('rank', t.rank, 'name', l.name, 'expiresOn', t.expires_on::text,
                        'suspended', t.suspended_at IS NOT NULL, 'revoked', t.revoked_at IS NOT NULL) ORDER BY t.rank DESC)
                        FROM member_tiers t JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
                       WHERE t.membership_id = p.membership_id AND t.confirmed_at IS NOT NULL), '[]') AS tiers
       FROM fill_passes p JOIN memberships m ON m.id = p.membership_id JOIN users u ON u.id = m.user_id
       JOIN clubs c ON c.id = p.club_id
      WHERE p.id = :passId AND (CAST(:clubId AS uuid) IS NULL OR p.club_id = CAST(:clubId AS uuid))`,
    { replacements: { passId, clubId: clubId ?? null }, type: QueryTypes.SELECT })
  if (!row) return 'unknown'
  if (row.replaced) return 'replaced'
  if (row.expired) return 'expired'
  return row
}

/**
 * What a fill pass shows anyone who scans it: the member's name, their tiers valid today (highest
 * first, with expiry) and whether the membership is active — nothing else.
 */
export async function verifyFillPass(token: string, now = new Date()): Promise<FillPassVerifyDto | FillPassRefusal> {
  const row = await readPass(token)
  if (typeof row === 'string') return row
  const today = clubToday({ timeZone: row.time_zone }, now)
  const status = membershipStatus({ paidThrough: row.paid_through, suspendedAt: row.suspended_at, resignedAt: row.resigned_at },
    { timeZone: row.time_zone, graceDays: row.grace_days, now })
  return {
    name: row.name,
    tiers: row.tiers.filter(t => tierState(t, today) === 'valid').sort((a, b) => b.rank - a.rank)
      .map(t => ({ code: tierCode(t.rank), name: t.name, expiresOn: t.expiresOn })),
    active: status === 'active',
  }
}

/** The member behind a scanned fill pass of `actor`'s club, for the fill page's staff. */
export async function fillPassMember(actor: Actor, token: string): Promise<FillPassMemberDto | FillPassRefusal> {
  const row = await readPass(token, actor.club.id)
  if (typeof row === 'string') return row
  return { memberId: row.membership_id, name: row.name }
}

/** The words of each refusal, with the status the API answers it with. */
export const FILL_PASS_REFUSALS: Record<FillPassRefusal, { statusCode: number, message: string }> = {
  unknown: { statusCode: 404, message: 'This is not a fill pass of this club: it may be mistyped or forged.' },
  replaced: { statusCode: 410, message: 'This fill pass was replaced by a newer one and no longer counts.' },
  expired: { statusCode: 410, message: 'This fill pass has expired: the member can show their current one.' },
}

/** Throws the refusal as its HTTP error. */
export function refuseFillPass(refusal: FillPassRefusal): never {
  const { statusCode, message } = FILL_PASS_REFUSALS[refusal]
  throw createError({ statusCode, statusMessage: statusCode === 404 ? 'Not Found' : 'Gone', message, data: { refusal } })
}
