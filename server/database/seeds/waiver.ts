import { User, Waiver, WaiverAcceptance } from '../../models'
import type { SeedContext } from './context'
import { DEMO_ACCOUNTS } from './members'

export const DEMO_WAIVER_TITLE = 'Saltmarsh Rocketry Guild risk waiver'
export const DEMO_WAIVER_BODY = `Water rockets store energy in compressed air. A vessel can burst, a rocket can launch without warning and laminating resins can sensitise skin for life.

I will follow the Guild's rules, the safety officer's instructions and local codes. I will proof-test vessels full of water and from a distance, never stand over a pressurised vessel, wear eye protection at the pad, and fill and release only from the remote station.

I will wear gloves and eye protection and work with ventilation when handling resin and hardener, and use extraction and a respirator when sanding composites.

Every figure Hoopwise computes is an estimate. It does not replace the Guild's rules, local codes or the judgement of a qualified person.`

/** Version 1 of the waiver, accepted by the demo accounts and most active members. */
export async function seedWaiver(ctx: SeedContext): Promise<void> {
  const { transaction, clubId } = ctx
  if (!clubId) throw new Error('seedClub must run before seedWaiver')
  const [waiver] = await Waiver.findOrCreate({
    where: { clubId, version: 1 },
    defaults: { title: DEMO_WAIVER_TITLE, body: DEMO_WAIVER_BODY, publishedBy: ctx.memberIds.get('safety@hoopwise.example') ?? null },
    transaction,
  })
  const demoEmails = new Set(DEMO_ACCOUNTS.map(a => a.email))
  // Each acceptance carries the name the member typed: their own.
  const users = await User.findAll({ where: { email: [...ctx.memberIds.keys()] }, transaction })
  const nameOf = new Map(users.map(u => [u.email, u.name]))
  const unconfirmed = new Set(users.filter(u => !u.emailVerifiedAt).map(u => u.email))
  let i = 0
  for (const [email, membershipId] of ctx.memberIds) {
    i += 1
    // Everyone but every fifth invented member has accepted, so the "waiver missing" views have data;
    // a member whose e-mail is unconfirmed cannot accept it yet.
    if ((!demoEmails.has(email) && i % 5 === 0) || unconfirmed.has(email)) continue
    await WaiverAcceptance.findOrCreate({
      where: { waiverId: waiver.id, membershipId },
      defaults: { clubId, typedName: nameOf.get(email) ?? email, acceptedAt: new Date() },
      transaction,
    })
  }
}
