import { kickImportJobs } from '../services/club-data'

/**
 * Carries on roster imports whose server stopped: shortly after boot, then every
 * NUXT_IMPORT_SWEEP_SECONDS (a job is claimed only once its lease has run out). Test servers skip the
 * timer; there the import page's request for a job carries it on.
 */
export default defineNitroPlugin(() => {
  if (process.env.TEST) return
  const boot = setTimeout(kickImportJobs, 3000)
  boot.unref()
  const every = Number(useRuntimeConfig().importSweepSeconds)
  if (every > 0) setInterval(kickImportJobs, every * 1000).unref()
})
