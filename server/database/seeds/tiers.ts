import { QueryTypes } from 'sequelize'
import { addCalendarDays, addCalendarMonths } from '#shared/utils/dates'
import { tierExpiresOn } from '#shared/utils/tier-rules'
import type { SeedContext } from './context'

const MEMBER = 'member@hoopwise.example'
const INSTRUCTOR = 'instructor@hoopwise.example'
const SAFETY = 'safety@hoopwise.example'
const at = (first: string, last: string) => `${first}.${last}@members.hoopwise.example`.toLowerCase()

interface DemoTier {
  email: string
  rank: number
  /** The sign-off's day from the seed date. */
  signed: (today: string) => string
  /** Who signed it off (null: the club's initial T4). */
  assessor: string | null
  suspended?: string
}

const daysAgo = (n: number) => (today: string) => addCalendarDays(today, -n)

// The safety officer holds the club's initial T4; the demo instructor T3 (and the T2 below it), the
// demo member T2 (and T1); the invented members spread over T0–T3: one T3 expires within 30 days,
// one T2 is suspended, the juniors stay at or below the junior cap (T1).
const DEMO_TIERS: DemoTier[] = [
  { email: SAFETY, rank: 4, signed: daysAgo(200), assessor: null },
  { email: INSTRUCTOR, rank: 2, signed: daysAgo(400), assessor: SAFETY },
  { email: INSTRUCTOR, rank: 3, signed: daysAgo(100), assessor: SAFETY },
  { email: MEMBER, rank: 1, signed: daysAgo(300), assessor: INSTRUCTOR },
  { email: MEMBER, rank: 2, signed: daysAgo(60), assessor: INSTRUCTOR },
  // Twelve months back and 20 days on: it expires 20 days from the seed date.
  { email: at('Odile', 'Marshcombe'), rank: 3, signed: today => addCalendarDays(addCalendarMonths(today, -12), 20), assessor: SAFETY },
  { email: at('Bram', 'Saltreed'), rank: 2, signed: daysAgo(150), assessor: INSTRUCTOR, suspended: 'Filled without eye protection at the last launch (demo record)' },
  { email: at('Bram', 'Saltreed'), rank: 1, signed: daysAgo(500), assessor: INSTRUCTOR },
  { email: at('Cressida', 'Ebbridge'), rank: 1, signed: daysAgo(90), assessor: INSTRUCTOR },
  { email: at('Rook', 'Brackenfen'), rank: 0, signed: daysAgo(40), assessor: INSTRUCTOR },
  { email: at('Saffi', 'Marshcombe'), rank: 1, signed: daysAgo(30), assessor: INSTRUCTOR },
  { email: at('Ulric', 'Ebbridge'), rank: 0, signed: daysAgo(20), assessor: INSTRUCTOR },
  { email: at('Vesna', 'Fluke'), rank: 1, signed: daysAgo(200), assessor: INSTRUCTOR },
  { email: at('Wren', 'Gullyhaven'), rank: 2, signed: daysAgo(250), assessor: INSTRUCTOR },
]

/** Pressure tiers across the demo club, each with its sign-off; a member who already holds the tier is left alone. */
export async function seedTiers(ctx: SeedContext): Promise<void> {
  const { sequelize, transaction } = ctx
  const clubId = ctx.clubId!
  const validity = new Map((await sequelize.query<{ rank: number, validity_months: number }>(
    'SELECT rank, validity_months FROM tier_levels WHERE club_id = :clubId', { replacements: { clubId }, type: QueryTypes.SELECT, transaction }))
    .map(r => [r.rank, r.validity_months]))
  for (const t of DEMO_TIERS) {
    const membershipId = ctx.memberIds.get(t.email)
    if (!membershipId) continue
    const signedOn = t.signed(ctx.today)
    const expiresOn = tierExpiresOn(signedOn, validity.get(t.rank)!)
    const suspendedBy = t.suspended ? ctx.memberIds.get(SAFETY) ?? null : null
    const [made] = await sequelize.query<{ id: string }>(
      `INSERT INTO member_tiers (club_id, membership_id, rank, first_granted_on, signed_on, expires_on, initial,
                                 suspended_at, suspension_reason, suspended_by_membership_id)
       VALUES (:clubId, :membershipId, :rank, :signedOn, :signedOn, :expiresOn, :initial,
               CASE WHEN :reason::text IS NULL THEN NULL ELSE now() END, :reason, :suspendedBy)
       ON CONFLICT (membership_id, rank) DO NOTHING RETURNING id`,
      {
        replacements: { clubId, membershipId, rank: t.rank, signedOn, expiresOn, initial: t.assessor === null, reason: t.suspended ?? null, suspendedBy },
        type: QueryTypes.SELECT, transaction,
      })
    if (!made) continue
    await sequelize.query(
      `INSERT INTO tier_signoffs (club_id, member_tier_id, membership_id, rank, kind, signed_on, expires_on, assessor_membership_id, notes)
       VALUES (:clubId, :tierId, :membershipId, :rank, :kind, :signedOn, :expiresOn, :assessor, :notes)`,
      {
        replacements: {
          clubId, tierId: made.id, membershipId, rank: t.rank, kind: t.assessor ? 'grant' : 'initial', signedOn, expiresOn,
          assessor: t.assessor ? ctx.memberIds.get(t.assessor)! : null,
          notes: t.assessor ? 'Demo sign-off: prerequisites checked at the field.' : 'The club\'s first T4 (demo).',
        },
        transaction,
      })
  }
}
