// The first admin of a deployment on a database of its own, made by `npm run admin:create`
// (scripts/admin-create.mjs) outside the server: models and an explicit transaction, as the seed does.
import { randomBytes } from 'node:crypto'
import { col, fn, where, type Sequelize } from 'sequelize'
import { ActionToken, Club, Membership, Notice, User } from '../models'
import { addCalendarDays, dateInZone } from '#shared/utils/dates'
import { recordAudit } from '../services/audit'
import { clubBaseUrl } from '../services/clubs'
import { composeNotice } from '../services/notices'
import { hashToken, TOKEN_LIFETIME_HOURS } from '../services/accounts'

export interface FirstAdminInput {
  email: string
  name: string
  /** The club to administer: found by name (any case), created when missing with the settings below. */
  clubName: string
  tagPrefix?: string
  timeZone: string
  units: 'bar' | 'psi'
  /** The site's public address: the base of every e-mailed link of a new club. */
  publicUrl: string
  /** The hash of the chosen password, or of a secret thrown away when `sendLink` is set. */
  passwordHash: string
  /** Queue an e-mail with a one-time link to choose the password instead (the running server sends it). */
  sendLink: boolean
}

export interface FirstAdminOutcome {
  clubId: string
  clubCreated: boolean
  userId: string
  membershipId: string
  /** The address the set-password link was queued to, when `sendLink` was set. */
  linkQueuedTo: string | null
}

/** A refusal the command line shows as it is (no stack trace). */
export class FirstAdminRefusal extends Error {}

/** A tag prefix (2–5 capital letters) from a club's name: its words' initials, else its first letters. */
export function tagPrefixFor(clubName: string): string {
  const letters = (s: string) => s.normalize('NFD').replace(/[^A-Za-z]/g, '').toUpperCase()
  const initials = letters(clubName.split(/\s+/).map(w => letters(w).charAt(0)).join(''))
  if (initials.length >= 2) return initials.slice(0, 5)
  return (letters(clubName) + 'XX').slice(0, Math.max(2, Math.min(5, letters(clubName).length)))
}

/**
 * Creates the club when missing, the account and an approved, paid-up admin membership (paid a year
 * ahead, so it starts active), with an audit event; with `sendLink`, also a one-time reset link and
 * its e-mail in the notice queue. One transaction: it all exists, or nothing does. Refuses an e-mail
 * that already has an account (an admin gives an existing member the role from the member page).
 */
export async function createFirstAdmin(sequelize: Sequelize, input: FirstAdminInput): Promise<FirstAdminOutcome> {
  return sequelize.transaction(async (transaction) => {
    const taken = await User.findOne({ where: where(fn('lower', col('email')), input.email.toLowerCase()), transaction })
    if (taken) throw new FirstAdminRefusal(`An account with ${input.email} already exists.`)
    let club = await Club.findOne({ where: where(fn('lower', col('name')), input.clubName.toLowerCase()), transaction })
    const clubCreated = !club
    club ??= await Club.create({
      name: input.clubName,
      tagPrefix: input.tagPrefix ?? tagPrefixFor(input.clubName),
      timeZone: input.timeZone,
      units: input.units,
      publicUrl: input.publicUrl,
      graceDays: 30,
      policy: {},
    }, { transaction })
    const now = new Date()
    const today = dateInZone(now, club.timeZone)
    const user = await User.create({
      email: input.email,
      name: input.name,
      passwordHash: input.passwordHash,
      // Whoever runs the command vouches for the address; a link proves it when it is used.
      emailVerifiedAt: input.sendLink ? null : now,
    }, { transaction })
    const membership = await Membership.create({
      clubId: club.id,
      userId: user.id,
      roles: ['member', 'admin'],
      approvedAt: now,
      paidThrough: addCalendarDays(today, 365),
    }, { transaction })
    await recordAudit(null, club.id, {
      action: 'member.admin_created',
      subjectType: 'membership',
      subjectId: membership.id,
      after: { roles: membership.roles },
      reason: 'Admin created from the command line (npm run admin:create)',
    }, transaction)
    if (input.sendLink) {
      // The reset page takes the link: it is a reset token, in an e-mail that says what happened.
      const token = randomBytes(32).toString('base64url')
      const issued = await ActionToken.create({
        userId: user.id,
        membershipId: membership.id,
        purpose: 'reset_password',
        tokenHash: hashToken(token),
        expiresAt: new Date(now.getTime() + TOKEN_LIFETIME_HOURS.reset_password * 3600_000),
      }, { transaction })
      const base = clubBaseUrl(club)
      const composed = composeNotice('set_password', {
        clubName: club.name,
        memberName: user.name,
        baseUrl: base,
        actionUrl: `${base}/reset-password?token=${encodeURIComponent(token)}`,
      })
      await Notice.create({
        clubId: club.id,
        membershipId: membership.id,
        kind: 'set_password',
        subjectKey: issued.id,
        dueOn: today,
        toEmail: user.email,
        subject: composed.subject,
        textBody: composed.text,
        htmlBody: composed.html,
      }, { transaction })
    }
    return {
      clubId: club.id,
      clubCreated,
      userId: user.id,
      membershipId: membership.id,
      linkQueuedTo: input.sendLink ? user.email : null,
    }
  })
}
