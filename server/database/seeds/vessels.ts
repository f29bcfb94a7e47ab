import { QueryTypes } from 'sequelize'
import { Vessel } from '../../models'
import { addCalendarDays } from '#shared/utils/dates'
import type { VesselRegistration } from '#shared/schemas/vessel'
import { vesselTag, type VesselState } from '#shared/utils/vessel-states'
import type { SeedContext } from './context'

interface DemoVessel extends Omit<VesselRegistration, 'metalInPressurePath' | 'lastLayupOn'> {
  owner: string
  /** Days before the seed date of the last layup, for laminates. */
  layupDaysAgo?: number
  state?: VesselState
}

// Invented vessels. None has a proof test yet, so none is in service: they await proof, or were
// retired by their owner (a retirement needs no proof).
const DEMO_VESSELS: DemoVessel[] = [
  { owner: 'member@hoopwise.example', name: 'Gull', construction: 'single_bottle', volumeL: 2, diameterMm: 102 },
  { owner: 'member@hoopwise.example', name: 'Twin Tern', construction: 'spliced_bottles', volumeL: 3.6, diameterMm: 102, lengthMm: 690 },
  {
    owner: 'member@hoopwise.example', name: 'Petrel', construction: 'overwrapped_liner', volumeL: 2.1, diameterMm: 104,
    fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3, resin: 'Laminating epoxy', layupDaysAgo: 3,
  },
  {
    owner: 'instructor@hoopwise.example', name: 'Longshore', construction: 'mandrel_tube', volumeL: 4.2, diameterMm: 90, lengthMm: 820,
    fibreClass: 'carbon', arealWeightGPerM2: 200, weave: 'woven_0_90', plies: 4, resin: 'Laminating epoxy', layupDaysAgo: 40,
  },
  { owner: 'safety@hoopwise.example', name: 'Old Faithful', construction: 'single_bottle', volumeL: 1.5, diameterMm: 92, state: 'retired' },
]

/**
 * A handful of demo vessels, mostly the demo member's. Found by owner and name, so a second run adds
 * nothing; a new one takes its tag from the club's counter, as a registration does.
 */
export async function seedVessels(ctx: SeedContext): Promise<void> {
  const { transaction, clubId } = ctx
  if (!clubId) throw new Error('seedClub must run before seedVessels')
  for (const { owner, layupDaysAgo, state, ...v } of DEMO_VESSELS) {
    const ownerMembershipId = ctx.memberIds.get(owner)
    if (!ownerMembershipId) throw new Error(`seedMembers must run before seedVessels (${owner})`)
    const found = await Vessel.findOne({ where: { clubId, ownerMembershipId, name: v.name }, transaction })
    if (found) continue
    // The same counter step as a registration (server/utils/locks.ts), on the seed's own connection.
    const [taken] = await ctx.sequelize.query<{ number: number, tag_prefix: string }>(
      `UPDATE clubs SET next_vessel_number = next_vessel_number + 1 WHERE id = :clubId
        RETURNING next_vessel_number - 1 AS number, tag_prefix`,
      { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
    await Vessel.create({
      ...v,
      clubId,
      ownerMembershipId,
      number: taken!.number,
      tag: vesselTag(taken!.tag_prefix, taken!.number),
      lastLayupOn: layupDaysAgo === undefined ? null : addCalendarDays(ctx.today, -layupDaysAgo),
      state: state ?? 'awaiting_proof',
    }, { transaction })
  }
}
