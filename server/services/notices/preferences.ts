import { QueryTypes, type Transaction } from 'sequelize'
import type { NoticeSettingsDto, OptOutPreviewDto } from '#shared/types/notices'
import { NOTICE_KINDS, isNoticeKind, optionalNoticeKinds, type NoticeKind } from './kinds'
import { readOptOutToken } from './opt-out'
import { optOutSecret } from './notices'

const NOT_OPTIONAL = { code: 'NOT_OPTIONAL', message: 'Safety and account notices cannot be switched off.' }

interface TokenMember { id: string, opt_outs: string[], club_name: string }

/** The member and kind a signed opt-out link names; 404 when the link is forged, altered or stale. */
async function memberOfToken(token: string): Promise<{ member: TokenMember, kind: string, def: NoticeKind }> {
  const read = readOptOutToken(optOutSecret(), token)
  if (!read || !isNoticeKind(read.kind)) notFound('This link is not valid. Open the newest e-mail, or change your settings in your profile.')
  const [member] = await useDb().query<TokenMember>(`
    SELECT m.id, m.notice_opt_outs AS opt_outs, c.name AS club_name
    FROM memberships m JOIN clubs c ON c.id = m.club_id WHERE m.id = :id`, { replacements: { id: read.membershipId }, type: QueryTypes.SELECT })
  if (!member) notFound('This link is not valid. Open the newest e-mail, or change your settings in your profile.')
  return { member, kind: read.kind, def: NOTICE_KINDS[read.kind] }
}

function preview(member: TokenMember, kind: string, def: NoticeKind, optedOut: boolean): OptOutPreviewDto {
  return { kind, label: def.label, description: def.description ?? null, clubName: member.club_name, optional: def.optional, optedOut }
}

/**
 * Switches `kinds` off for a member (adding to what is already off) and skips their queued notices
 * of those kinds, in `transaction`. Idempotent.
 */
async function addOptOuts(membershipId: string, kinds: string[], transaction: Transaction): Promise<void> {
  const db = useDb()
  await db.query(`UPDATE memberships SET notice_opt_outs = ARRAY(SELECT DISTINCT unnest(notice_opt_outs || ARRAY[:kinds]::text[]) ORDER BY 1),
    updated_at = now() WHERE id = :id`, { replacements: { id: membershipId, kinds }, transaction })
  await db.query(`UPDATE notices SET status = 'skipped', last_error = 'The member opted out of this kind', updated_at = now()
    WHERE membership_id = :id AND kind IN (:kinds) AND status = 'queued'`, { replacements: { id: membershipId, kinds }, transaction })
}

/** What an opt-out link would switch off, for the page that asks the member to confirm. */
export async function previewOptOut(token: string): Promise<OptOutPreviewDto> {
  const { member, kind, def } = await memberOfToken(token)
  return preview(member, kind, def, member.opt_outs.includes(kind))
}

/**
 * Applies a one-click opt-out link (no sign-in: the signature is the proof). 422 NOT_OPTIONAL for
 * safety kinds; using the link again changes nothing.
 */
export async function applyOptOut(token: string): Promise<OptOutPreviewDto> {
  const { member, kind, def } = await memberOfToken(token)
  if (!def.optional) refuse(NOT_OPTIONAL)
  await inTransaction(t => addOptOuts(member.id, [kind], t))
  return preview(member, kind, def, true)
}

/** The member's optional kinds, each on or off. */
export async function noticeSettings(membershipId: string): Promise<NoticeSettingsDto> {
  const [row] = await useDb().query<{ opt_outs: string[] }>('SELECT notice_opt_outs AS opt_outs FROM memberships WHERE id = :id',
    { replacements: { id: membershipId }, type: QueryTypes.SELECT })
  const off = row?.opt_outs ?? []
  return {
    kinds: optionalNoticeKinds().map(kind => ({
      kind,
      label: NOTICE_KINDS[kind].label,
      description: (NOTICE_KINDS[kind] as NoticeKind).description ?? null,
      enabled: !off.includes(kind),
    })),
  }
}

/**
 * Sets which optional kinds the member has switched off (the whole list). 400 for a kind that does
 * not exist, 422 NOT_OPTIONAL for a safety kind.
 */
export async function saveNoticeSettings(membershipId: string, optOuts: string[]): Promise<NoticeSettingsDto> {
  const unknown = optOuts.find(k => !isNoticeKind(k))
  if (unknown) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `Unknown notice kind: ${unknown}`, data: { fields: { optOuts: `Unknown notice kind: ${unknown}` } } })
  }
  if (optOuts.some(k => isNoticeKind(k) && !NOTICE_KINDS[k].optional)) refuse(NOT_OPTIONAL)
  const kinds = [...new Set(optOuts)]
  await inTransaction(async (transaction) => {
    // Whatever is not an optional kind (none today) is kept; the optional kinds are set as asked.
    await useDb().query(`UPDATE memberships SET notice_opt_outs = ARRAY(SELECT k FROM unnest(notice_opt_outs) k WHERE NOT (k = ANY(ARRAY[:optional]::text[])) ORDER BY 1),
      updated_at = now() WHERE id = :id`, { replacements: { id: membershipId, optional: optionalNoticeKinds() }, transaction })
    if (kinds.length) await addOptOuts(membershipId, kinds, transaction)
  })
  return noticeSettings(membershipId)
}
