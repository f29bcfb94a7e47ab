import { QueryTypes } from 'sequelize'
import { Waiver } from '../../models'
import { recordAudit } from '../audit'
import { waiverStanding } from '../members'
import type { Actor } from '../../utils/auth'
import type { WaiverAccept, WaiverPublish } from '#shared/schemas/waiver'
import { WAIVER_NEEDS_EMAIL } from '#shared/utils/approval'
import type { WaiverAcceptedDto, WaiverDto, WaiverVersionDto } from '#shared/types/waivers'

interface WaiverRow {
  id: string
  version: number
  title: string
  body: string
  published_at: Date
  published_by_name: string | null
  acceptances?: number
}

const toDto = (r: WaiverRow): WaiverDto => ({
  id: r.id,
  version: r.version,
  title: r.title,
  body: r.body,
  publishedAt: new Date(r.published_at).toISOString(),
  publishedByName: r.published_by_name,
})

/** The club's waivers (all, or the one with id :id), newest first, with the publisher's name and the acceptance count. */
function selectWaivers(oneId: boolean) {
  return `
  SELECT w.id, w.version, w.title, w.body, w.published_at, u.name AS published_by_name,
    (SELECT count(*) FROM waiver_acceptances a WHERE a.waiver_id = w.id)::int AS acceptances
  FROM waivers w LEFT JOIN memberships p ON p.id = w.published_by LEFT JOIN users u ON u.id = p.user_id
  WHERE w.club_id = :clubId ${oneId ? 'AND w.id = :id' : ''} ORDER BY w.version DESC`
}

/** The club's waiver version in force (the highest), or null when none has been published. */
export async function currentWaiver(clubId: string): Promise<WaiverDto | null> {
  const [row] = await useDb().query<WaiverRow>(`${selectWaivers(false)} LIMIT 1`, { replacements: { clubId }, type: QueryTypes.SELECT })
  return row ? toDto(row) : null
}

/** Every published version, newest first, with how many members accepted each. */
export async function waiverHistory(clubId: string): Promise<WaiverVersionDto[]> {
  const rows = await useDb().query<WaiverRow>(selectWaivers(false), { replacements: { clubId }, type: QueryTypes.SELECT })
  return rows.map(r => ({ ...toDto(r), acceptances: r.acceptances ?? 0 }))
}

/**
 * Publishes a NEW version (the highest + 1) and audits it, in one transaction. Old versions are
 * never edited. Two officers publishing at once collide on UNIQUE (club_id, version): the loser gets 409.
 */
export async function publishWaiver(actor: Actor, input: WaiverPublish): Promise<WaiverDto> {
  const clubId = actor.club.id
  const id = await inTransaction(async (transaction) => {
    const previous = (await Waiver.max<number | null, Waiver>('version', { where: { clubId }, transaction })) ?? 0
    const waiver = await Waiver.create({ clubId, version: previous + 1, title: input.title, body: input.body, publishedBy: actor.membership.id }, { transaction })
    await recordAudit(actor, clubId, {
      action: 'waiver.publish',
      subjectType: 'waiver',
      subjectId: waiver.id,
      before: previous ? { version: previous } : null,
      after: { version: waiver.version, title: waiver.title },
    }, transaction)
    return waiver.id
  }, { uniqueMessage: 'Another version was published at the same moment. Reload and check it before publishing again.' })
  const [row] = await useDb().query<WaiverRow>(selectWaivers(true), { replacements: { clubId, id }, type: QueryTypes.SELECT })
  return toDto(row!)
}

/** Names compared as people type them: trimmed, inner spaces collapsed, case ignored. */
export function sameName(a: string, b: string): boolean {
  const norm = (s: string) => s.normalize('NFC').trim().replace(/\s+/g, ' ').toLocaleLowerCase()
  return norm(a) === norm(b)
}

/**
 * Records the member's acceptance of the version in force (typed name, time, version).
 * 422 EMAIL_NOT_CONFIRMED until the member has confirmed their e-mail (the acceptance is a signed
 * record: it must belong to an address that is known to be theirs), WAIVER_OUTDATED when `version` is not the current one, NAME_MISMATCH when the typed name is
 * not the member's (both listed when both fail), NO_WAIVER when none is published. Accepting the
 * same version twice is idempotent: the first acceptance stands and `alreadyAccepted` is true.
 */
export async function acceptWaiver(actor: Actor, input: WaiverAccept): Promise<WaiverAcceptedDto> {
  const clubId = actor.club.id
  if (!actor.user.emailVerifiedAt) refuse(WAIVER_NEEDS_EMAIL)
  const current = await Waiver.findOne({ where: { clubId }, order: [['version', 'DESC']] })
  if (!current) refuse({ code: 'NO_WAIVER', message: 'The club has not published a waiver yet.' })
  const reasons = []
  if (input.version !== current.version) {
    reasons.push({ code: 'WAIVER_OUTDATED', message: `You read version ${input.version}, but version ${current.version} is now in force. Read it and accept that one.` })
  }
  if (!sameName(input.typedName, actor.user.name)) {
    reasons.push({ code: 'NAME_MISMATCH', message: `Type your full name exactly as the club has it: ${actor.user.name}.` })
  }
  if (reasons.length) refuse(reasons)
  // ON CONFLICT: a double click or a second tab keeps the first acceptance.
  const inserted = await useDb().query<{ id: string }>(`
    INSERT INTO waiver_acceptances (club_id, waiver_id, membership_id, typed_name)
    VALUES (:clubId, :waiverId, :membershipId, :typedName)
    ON CONFLICT (waiver_id, membership_id) DO NOTHING RETURNING id`, {
    replacements: { clubId, waiverId: current.id, membershipId: actor.membership.id, typedName: input.typedName },
    type: QueryTypes.SELECT,
  })
  return { standing: await waiverStanding(clubId, actor.membership.id), alreadyAccepted: inserted.length === 0 }
}
