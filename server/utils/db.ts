import type { Sequelize } from 'sequelize'
import { createSequelize } from '../models'

let instance: Sequelize | undefined

/** The app's one Sequelize instance, created on first use from `NUXT_DATABASE_URL`. */
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
