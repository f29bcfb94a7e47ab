// The first T4 of a club that never had one, made by `npm run tier:initial` (scripts/tier-initial.mjs)
// outside the server, as the first admin is: models and an explicit transaction.
import { QueryTypes, type Sequelize } from 'sequelize'
import { Club } from '../models'
import { dateInZone } from '#shared/utils/dates'
import { TOP_TIER_RANK, tierExpiresOn } from '#shared/utils/tier-rules'
import { recordAudit } from '../services/audit'
import { lockMemberships } from '../utils/locks'

export interface InitialTierOutcome { membershipId: string, clubName: string, expiresOn: string }

/** A refusal the command line shows as it is (no stack trace). */
export class InitialTierRefusal extends Error {}

/**
 * Grants the member with e-mail `email` (in the club named `clubName`, needed only when the account
 * belongs to several) the club's first T4: prerequisites waived, marked initial, a sign-off of kind
 * 'initial' without an assessor, audited. Refused once any T4 sign-off has ever existed in the club
 * (the one-initial index backs this against two runs at once).
 */
export async function grantInitialTier(sequelize: Sequelize, input: { email: string, clubName?: string }): Promise<InitialTierOutcome> {
  return sequelize.transaction(async (transaction) => {
    const found = await sequelize.query<{ id: string, club_id: string, club_name: string }>(
      `SELECT m.id, m.club_id, c.name AS club_name FROM memberships m JOIN users u ON u.id = m.user_id JOIN clubs c ON c.id = m.club_id
        WHERE lower(u.email) = lower(:email) AND (:clubName::text IS NULL OR lower(c.name) = lower(:clubName::text))`,
      { replacements: { email: input.email, clubName: input.clubName ?? null }, type: QueryTypes.SELECT, transaction })
    if (!found.length) throw new InitialTierRefusal(`No member with ${input.email}${input.clubName ? ` in ${input.clubName}` : ''}.`)
    if (found.length > 1) throw new InitialTierRefusal(`${input.email} belongs to several clubs: name one with --club.`)
    const member = found[0]!
    await lockMemberships([member.id], transaction)
    const [had] = await sequelize.query<{ n: number }>(
      `SELECT count(*)::int AS n FROM tier_signoffs WHERE club_id = :clubId AND rank = :rank`,
      { replacements: { clubId: member.club_id, rank: TOP_TIER_RANK }, type: QueryTypes.SELECT, transaction })
    if (had!.n > 0) throw new InitialTierRefusal(`${member.club_name} has had a T4 already: further T4s are signed off by a safety officer holding T4.`)
    const club = (await Club.findByPk(member.club_id, { transaction }))!
    const today = dateInZone(new Date(), club.timeZone)
    const [level] = await sequelize.query<{ validity_months: number }>(
      'SELECT validity_months FROM tier_levels WHERE club_id = :clubId AND rank = :rank',
      { replacements: { clubId: club.id, rank: TOP_TIER_RANK }, type: QueryTypes.SELECT, transaction })
    const expiresOn = tierExpiresOn(today, level!.validity_months)
    const [tier] = await sequelize.query<{ id: string }>(
      `INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on, initial)
       VALUES (:clubId, :membershipId, :rank, :today, :today, :expiresOn, true)
       ON CONFLICT (membership_id, rank) DO UPDATE SET first_granted_on = EXCLUDED.first_granted_on, signed_on = EXCLUDED.signed_on,
         expires_on = EXCLUDED.expires_on, initial = true, suspended_at = NULL, suspension_reason = NULL, suspended_by_membership_id = NULL,
         revoked_at = NULL, revocation_reason = NULL, revoked_by_membership_id = NULL,
         confirmed_at = COALESCE(member_tiers.confirmed_at, now()), updated_at = now()
       RETURNING id`,
      { replacements: { clubId: club.id, membershipId: member.id, rank: TOP_TIER_RANK, today, expiresOn }, type: QueryTypes.SELECT, transaction })
    await sequelize.query(
      `INSERT INTO tier_signoffs (club_id, member_tier_id, membership_id, rank, kind, signed_on, expires_on, assessor_membership_id, notes)
       VALUES (:clubId, :tierId, :membershipId, :rank, 'initial', :today, :expiresOn, NULL, 'The club''s first T4, granted from the command line; prerequisites waived.')`,
      { replacements: { clubId: club.id, tierId: tier!.id, membershipId: member.id, rank: TOP_TIER_RANK, today, expiresOn }, transaction })
    await recordAudit(null, club.id, {
      action: 'tier.initial', subjectType: 'membership', subjectId: member.id,
      after: { rank: TOP_TIER_RANK, signedOn: today, expiresOn, initial: true },
      reason: 'The club\'s first T4 from the command line (npm run tier:initial); prerequisites waived',
    }, transaction)
    return { membershipId: member.id, clubName: club.name, expiresOn }
  })
}
