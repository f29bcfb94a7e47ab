/** Liveness with the database: exactly one `SELECT 1` round trip, never cached. */
export default defineEventHandler(async (event) => {
  setResponseHeader(event, 'cache-control', 'no-store')
  try {
    await useDb().query('SELECT 1', { raw: true, plain: true })
    return { ok: true, db: 'up' as const }
  }
  catch {
    setResponseStatus(event, 503)
    return { ok: false, db: 'down' as const }
  }
})
