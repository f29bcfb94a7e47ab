/** Fail fast at boot when the database is unreachable; close the pool when the server shuts down. */
export default defineNitroPlugin(async (nitroApp) => {
  try {
    await useDb().authenticate()
  }
  catch (error) {
    console.error(`[db] PostgreSQL is unreachable at boot: ${(error as Error).message}`)
    process.exit(1)
  }
  nitroApp.hooks.hook('close', async () => {
    await closeDb()
  })
})
