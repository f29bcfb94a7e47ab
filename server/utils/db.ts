import { UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize'
import { createSequelize } from '../models'
import { conflict, mapDbError } from './errors'

let instance: Sequelize | undefined

/**
 * The app's one Sequelize instance, created on first use from `NUXT_DATABASE_URL`. Creating it
 * initialises every model; `plugins/db.ts` does so at boot, so a service imports a model and uses it.
 */
export function useDb(): Sequelize {
  if (!instance) {
    const url = useRuntimeConfig().databaseUrl
    if (!url) throw new Error('NUXT_DATABASE_URL is not set')
    instance = createSequelize(url)
  }
  return instance
}

/** Closes the pool (server shutdown). */
export async function closeDb(): Promise<void> {
  if (instance) await instance.close()
  instance = undefined
}

/**
 * Runs `work` in one transaction. A database error becomes 409/422 (mapDbError), never a 500; with
 * `uniqueMessage`, a unique-key clash answers 409 with those words instead of the generic ones.
 * Row locks inside it come from `utils/locks.ts`, in its order.
 */
export function inTransaction<T>(work: (transaction: Transaction) => Promise<T>, options: { uniqueMessage?: string } = {}): Promise<T> {
  return useDb().transaction(work).catch((error: unknown) => {
    if (options.uniqueMessage && error instanceof UniqueConstraintError) conflict(options.uniqueMessage)
    return mapDbError(error)
  })
}
