import type { Sequelize, Transaction } from 'sequelize'

/** What every seed step receives. Steps are idempotent: running the seed again duplicates nothing. */
export interface SeedContext {
  sequelize: Sequelize
  transaction: Transaction
  /** Hashes a password with the server's scrypt parameters (server/services/accounts/password-hashing.ts). */
  hashPassword: (plain: string) => Promise<string>
  /** The site's public address, used in e-mail links and QR codes. */
  publicUrl: string
  /** Today (YYYY-MM-DD) in the demo club's time zone; demo data is dated relative to it. */
  today: string
  /** Filled in by the club step for the steps after it. */
  clubId?: string
  /** Membership ids by demo e-mail, filled in by the members step. */
  memberIds: Map<string, string>
}

export const DEMO_PASSWORD = 'hoopwise-demo'
export const DEMO_TIME_ZONE = 'Europe/London'
