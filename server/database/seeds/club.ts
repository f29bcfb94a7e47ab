import { Club } from '../../models'
import type { SeedContext } from './context'
import { DEMO_TIME_ZONE } from './context'

/** The invented demo club on a tidal flat. */
export async function seedClub(ctx: SeedContext): Promise<void> {
  const [club] = await Club.findOrCreate({
    where: { tagPrefix: 'SRG' },
    defaults: {
      name: 'Saltmarsh Rocketry Guild',
      timeZone: DEMO_TIME_ZONE,
      units: 'bar',
      publicUrl: ctx.publicUrl,
      graceDays: 30,
      policy: { juniorTierCap: 'T1' },
    },
    transaction: ctx.transaction,
  })
  // The public address follows the configuration (it differs between the demo and the tests).
  if (club.publicUrl !== ctx.publicUrl) await club.update({ publicUrl: ctx.publicUrl }, { transaction: ctx.transaction })
  ctx.clubId = club.id
}
