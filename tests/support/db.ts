// Plain SQL against the test database, for checks the API cannot make (nothing written, trigger refusals).
import pg from 'pg'
import { testEnv } from './test-env'

/** Runs `sql` with `params` on a short-lived connection and returns the rows. */
export async function sql<T = Record<string, unknown>>(text: string, params: unknown[] = [], databaseUrl = testEnv.databaseUrl): Promise<T[]> {
  const client = new pg.Client({ connectionString: databaseUrl })
  await client.connect()
  try {
    const res = await client.query(text, params)
    return res.rows as T[]
  }
  finally {
    await client.end()
  }
}
