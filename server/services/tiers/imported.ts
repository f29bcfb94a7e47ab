import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockMemberships } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubToday } from '../clubs'
import { assessorProblem, tierCode, type TierRank } from '#shared/utils/tier-rules'
import type { UnconfirmedTierDto } from '#shared/types/imported'
import { validRankOf } from './held'
import { requireQualifiedAssessor } from './signoffs'

// Pressure tiers a roster import brought in: unconfirmed (confirmed_at NULL) until an assessor who
// may sign off that tier (assessorProblem: never oneself, a valid tier above, T4 only by a safety
// officer holding T4) vouches for each. Held-tier reads and the fill gate see confirmed rows only.

/** The most unconfirmed tiers one list shows (oldest imports first); confirming makes room. */
const LIST_LIMIT = 500

interface UnconfirmedTierRow {
  id: string
  membership_id: string
  member_name: string
  rank: number
  name: string
  first_granted_on: string
  signed_on: string
  expires_on: string
  imported_assessor_name: string | null
  updated_at: Date
}

/**
 * The unconfirmed imported tiers of the actor's club, oldest first, each with why the actor may not
 * confirm it (the same rule the confirmation applies), so the page offers only what will succeed.
 */
export async function unconfirmedTiers(actor: Actor): Promise<UnconfirmedTierDto[]> {
  const [rows, myRank] = await Promise.all([
    useDb().query<UnconfirmedTierRow>(
      `SELECT t.id, t.membership_id, u.name AS member_name, t.rank, l.name, t.first_granted_on::text AS first_granted_on,
              t.signed_on::text AS signed_on, t.expires_on::text AS expires_on, t.imported_assessor_name, t.updated_at
         FROM member_tiers t JOIN tier_levels l ON l.club_id = t.club_id AND l.rank = t.rank
         JOIN memberships m ON m.id = t.membership_id JOIN users u ON u.id = m.user_id
        WHERE t.club_id = :clubId AND t.confirmed_at IS NULL
        ORDER BY t.updated_at, lower(u.name), t.rank, t.id LIMIT :limit`,
      { replacements: { clubId: actor.club.id, limit: LIST_LIMIT }, type: QueryTypes.SELECT }),
    validRankOf(actor.membership.id, clubToday(actor.club)),
  ])
  const me = { membershipId: actor.membership.id, roles: actor.roles, validRank: myRank }
  return rows.map(r => ({
    id: r.id, membershipId: r.membership_id, memberName: r.member_name, rank: r.rank as TierRank, code: tierCode(r.rank),
    name: r.name, firstGrantedOn: r.first_granted_on, signedOn: r.signed_on, expiresOn: r.expires_on,
    importedAssessorName: r.imported_assessor_name, importedAt: new Date(r.updated_at).toISOString(),
    problem: assessorProblem(me, r.membership_id, r.rank as TierRank),
  }))
}

/**
 * Imported tier `id` of the actor's club with its member's row locked (step 1 of the lock order), if
 * still unconfirmed and the actor may sign off its rank: 404 no such tier, 409 confirmed already, 422
 * with the assessor rule's words otherwise (SELF_SIGN_OFF, ASSESSOR_NOT_QUALIFIED).
 */
async function lockUnconfirmedTier(actor: Actor, id: string, transaction: Transaction): Promise<{ membership_id: string, rank: TierRank, signed_on: string, expires_on: string }> {
  const find = () => useDb().query<{ membership_id: string, rank: TierRank, signed_on: string, expires_on: string, confirmed: boolean }>(
    `SELECT membership_id, rank, signed_on::text AS signed_on, expires_on::text AS expires_on, confirmed_at IS NOT NULL AS confirmed
       FROM member_tiers WHERE id = :id AND club_id = :clubId`,
    { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT, transaction })
  const [seen] = await find()
  if (!seen) notFound('No such tier')
  await lockMemberships([seen.membership_id], transaction, actor.club.id)
  const [row] = await find()
  if (!row) notFound('No such tier')
  if (row.confirmed) conflict(`This ${tierCode(row.rank)} is confirmed already.`)
  await requireQualifiedAssessor(actor, row.membership_id, row.rank, clubToday(actor.club), transaction)
  return row
}

/**
 * A qualified assessor (tiers.grant, under the usual assessor rules) confirms imported tier `id`: from
 * now on it counts for the fill gate, the fall-back rule and every other tier rule, with the dates the
 * import gave it (an expired one stays expired). Audited.
 */
export async function confirmImportedTier(actor: Actor, id: string): Promise<{ id: string, confirmedAt: string }> {
  return inTransaction(async (transaction) => {
    const row = await lockUnconfirmedTier(actor, id, transaction)
    const [done] = await useDb().query<{ confirmed_at: Date }>(
      `UPDATE member_tiers SET confirmed_at = now(), confirmed_by_membership_id = :me, updated_at = now()
        WHERE id = :id AND confirmed_at IS NULL RETURNING confirmed_at`,
      { replacements: { id, me: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    if (!done) conflict(`This ${tierCode(row.rank)} is confirmed already.`)
    await recordAudit(actor, actor.club.id, {
      action: 'tier.confirm', subjectType: 'membership', subjectId: row.membership_id,
      before: { rank: row.rank, confirmed: false }, after: { rank: row.rank, confirmed: true, memberTierId: id, signedOn: row.signed_on, expiresOn: row.expires_on },
    }, transaction)
    return { id, confirmedAt: new Date(done.confirmed_at).toISOString() }
  })
}

/**
 * A qualified assessor rejects imported tier `id` that cannot be vouched for: it is deleted (it never
 * counted, and no sign-off points at it), and the audit trail keeps what it said and the reason.
 */
export async function rejectImportedTier(actor: Actor, id: string, reason: string): Promise<{ id: string, deleted: true }> {
  return inTransaction(async (transaction) => {
    const row = await lockUnconfirmedTier(actor, id, transaction)
    await useDb().query('DELETE FROM member_tiers WHERE id = :id AND confirmed_at IS NULL', { replacements: { id }, transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'tier.reject', subjectType: 'membership', subjectId: row.membership_id,
      before: { rank: row.rank, confirmed: false, memberTierId: id, signedOn: row.signed_on, expiresOn: row.expires_on }, after: null, reason,
    }, transaction)
    return { id, deleted: true as const }
  })
}
