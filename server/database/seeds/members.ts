import { Membership, User } from '../../models'
import { addCalendarDays } from '#shared/utils/dates'
import type { Role } from '#shared/utils/permissions'
import type { SeedContext } from './context'
import { DEMO_PASSWORD } from './context'

interface DemoPerson {
  email: string
  name: string
  roles?: Role[]
  /** Paid-through relative to today in days; null = never paid. */
  paidDays: number | null
  approved?: boolean
  suspended?: string
  resigned?: boolean
  /** Age in years on the seed date (juniors are under 18). */
  age: number
  guardian?: { name: string, email: string, consented: boolean }
  verified?: boolean
}

/** The four demo sign-ins named in the README, then invented members across every status. */
export const DEMO_ACCOUNTS: DemoPerson[] = [
  { email: 'member@hoopwise.example', name: 'Maren Tidewell', paidDays: 200, age: 34 },
  { email: 'instructor@hoopwise.example', name: 'Idris Quillfeather', roles: ['instructor'], paidDays: 260, age: 47 },
  { email: 'safety@hoopwise.example', name: 'Sabine Harrowgate', roles: ['instructor', 'safety_officer'], paidDays: 300, age: 52 },
  { email: 'admin@hoopwise.example', name: 'Anselm Brackwater', roles: ['admin'], paidDays: 150, age: 41 },
]

const FIRST = ['Odile', 'Bram', 'Cressida', 'Dov', 'Elowen', 'Fenn', 'Gwilym', 'Hollis', 'Ines', 'Jory', 'Kestrel',
  'Lorcan', 'Mirela', 'Nell', 'Osric', 'Pell', 'Quenby', 'Rook', 'Saffi', 'Tamsin', 'Ulric', 'Vesna', 'Wren',
  'Xanthe', 'Yestin', 'Zillah', 'Aubrey', 'Brisk', 'Corin', 'Delphine', 'Emrys', 'Fable', 'Gorse', 'Heddwyn', 'Ilse', 'Juniper']
const LAST = ['Marshcombe', 'Saltreed', 'Ebbridge', 'Fluke', 'Gullyhaven', 'Kelpford', 'Mudlark', 'Oysterby', 'Pebblewick',
  'Reedmere', 'Samphire', 'Shinglebank', 'Spartina', 'Tidemark', 'Wadeholm', 'Wickerwade', 'Cordgrass', 'Brackenfen']

/** Status mix for the 36 invented members: [paidDays, extra] in order. */
function inventedMembers(): DemoPerson[] {
  return FIRST.map((first, i) => {
    const last = LAST[i % LAST.length]!
    const email = `${first}.${last}`.toLowerCase() + '@members.hoopwise.example'
    const base: DemoPerson = { email, name: `${first} ${last}`, paidDays: 30 + ((i * 37) % 300), age: 22 + ((i * 7) % 45) }
    if (i < 3) return { ...base, roles: ['instructor'] as Role[] }
    if (i < 6) return { ...base, paidDays: -((i - 2) * 9) } // grace: 9, 18, 27 days past
    if (i < 10) return { ...base, paidDays: -(40 + i * 20) } // lapsed
    if (i < 12) return { ...base, paidDays: null, approved: false, verified: i === 10 } // pending, awaiting approval
    if (i === 12) return { ...base, paidDays: null, approved: true } // pending, approved, first dues not paid
    if (i < 15) return { ...base, suspended: 'Filled above the event cap without a supervisor (demo record)' }
    if (i < 17) return { ...base, paidDays: -120, resigned: true }
    if (i < 20) {
      // Juniors: two approved with their guardian's consent; the third signed up lately and waits
      // for it (approval needs the consent, so it is not approved yet).
      const consented = i !== 19
      return {
        ...base, age: 13 + (i - 17) * 2,
        ...(consented ? {} : { paidDays: null, approved: false }),
        guardian: { name: `Guardian of ${first}`, email: `guardian.${first.toLowerCase()}@family.hoopwise.example`, consented },
      }
    }
    if (i === 20) return { ...base, paidDays: 12 } // renewal due soon
    return base
  })
}

/** Accounts and memberships. The shared demo password is hashed once, not once per member. */
export async function seedMembers(ctx: SeedContext): Promise<void> {
  const { transaction, clubId } = ctx
  if (!clubId) throw new Error('seedClub must run before seedMembers')
  const passwordHash = await ctx.hashPassword(DEMO_PASSWORD)
  const now = new Date()
  for (const person of [...DEMO_ACCOUNTS, ...inventedMembers()]) {
    const [user] = await User.findOrCreate({
      where: { email: person.email },
      defaults: { name: person.name, passwordHash, emailVerifiedAt: person.verified === false ? null : now },
      transaction,
    })
    const [y, m, d] = ctx.today.split('-')
    const birthDate = `${Number(y) - person.age}-${m}-${d === '29' && m === '02' ? '28' : d}`
    const [membership, created] = await Membership.findOrCreate({
      where: { clubId, userId: user.id },
      defaults: {
        roles: ['member', ...(person.roles ?? [])],
        approvedAt: person.approved === false ? null : now,
        paidThrough: person.paidDays === null ? null : addCalendarDays(ctx.today, person.paidDays),
        suspendedAt: person.suspended ? now : null,
        suspendedReason: person.suspended ?? null,
        resignedAt: person.resigned ? now : null,
        birthDate: addCalendarDays(birthDate, -30),
        guardianName: person.guardian?.name ?? null,
        guardianEmail: person.guardian?.email ?? null,
        guardianConsentAt: person.guardian?.consented ? now : null,
        phone: '+44 1632 960' + String(100 + ctx.memberIds.size).slice(-3),
        emergencyContactName: 'Next of kin (demo)',
        emergencyContactPhone: '+44 1632 961' + String(100 + ctx.memberIds.size).slice(-3),
        unitPreference: ctx.memberIds.size % 4 === 1 ? 'psi' : 'bar',
      },
      transaction,
    })
    if (created) {
      // Members joined over the past years (the directory's "Joined" column), not all on seed day.
      const joinedDaysAgo = 20 + ((ctx.memberIds.size * 97) % 1800)
      await ctx.sequelize.query(`UPDATE memberships SET created_at = now() - make_interval(days => :days) WHERE id = :id`,
        { replacements: { days: joinedDaysAgo, id: membership.id }, transaction })
    }
    ctx.memberIds.set(person.email, membership.id)
  }
}
