import type { Sequelize } from 'sequelize'
import { dateInZone } from '#shared/utils/dates'
import type { SeedContext } from './context'
import { DEMO_TIME_ZONE } from './context'
import { seedClub } from './club'
import { seedMembers } from './members'
import { seedWaiver } from './waiver'
import { seedVessels } from './vessels'
import { seedCouponTests } from './coupons'
import { seedTraining } from './training'
import { seedStations } from './stations'
import { seedDuesPayments } from './dues'
import { seedTiers } from './tiers'
import { seedEvents } from './events'
import { seedIncidents } from './incidents'

/**
 * The demo club's seed, in order. Each step is idempotent (it finds its records by natural keys
 * before creating them), so running the seed again duplicates nothing. Later issues append steps.
 */
export const SEED_STEPS: ((ctx: SeedContext) => Promise<void>)[] = [
  seedClub,
  seedMembers,
  seedWaiver,
  seedVessels,
  seedCouponTests,
  seedTraining,
  seedStations,
  seedDuesPayments,
  seedTiers,
  seedEvents,
  seedIncidents,
]

/** Seeds the demo club in one transaction. */
export async function seedDemo(sequelize: Sequelize, opts: { hashPassword: SeedContext['hashPassword'], publicUrl: string }) {
  await sequelize.transaction(async (transaction) => {
    const ctx: SeedContext = {
      sequelize,
      transaction,
      hashPassword: opts.hashPassword,
      publicUrl: opts.publicUrl,
      today: dateInZone(new Date(), DEMO_TIME_ZONE),
      memberIds: new Map(),
    }
    for (const step of SEED_STEPS) await step(ctx)
  })
}
