#!/usr/bin/env node
// `npm start` (production build) and `npm run dev` (hot reload): installs what is missing, starts a
// private PostgreSQL (unless NUXT_DATABASE_URL names a database of your own) and the mail catcher,
// migrates, seeds the demo club on the private cluster only, then serves Hoopwise. Ctrl-C stops all.
import { spawnSync } from 'node:child_process'
import { join } from 'node:path'
import { ROOT, DEV, PAYMENT_FAKE_KEYS, loadDotEnv, ensureDir, ensureDependencies } from './lib/config.mjs'

const dev = process.argv.includes('--dev')

ensureDependencies()

const { startPostgres } = await import('./lib/postgres.mjs')
const { startMailCatcher, startPaymentFake, startProcess, waitForHttp } = await import('./lib/processes.mjs')
const { setUpDatabase } = await import('./lib/setup.mjs')
const { backupSettings, scheduleNightlyBackups } = await import('./lib/backup.mjs')

const fileEnv = loadDotEnv()
// The set-up reads both: a line in .env counts as if it were in the environment.
const setupEnv = { ...fileEnv, ...process.env }
const publicUrl = process.env.NUXT_PUBLIC_URL ?? fileEnv.NUXT_PUBLIC_URL ?? `http://localhost:${DEV.appPort}`
const useRealSmtp = Boolean(process.env.NUXT_SMTP_HOST ?? fileEnv.NUXT_SMTP_HOST)
// Real payment keys in the environment: the SDK talks to the real service and no fake starts.
const useRealPayments = Boolean(process.env.NUXT_PAYMENTS_SECRET_KEY ?? fileEnv.NUXT_PAYMENTS_SECRET_KEY)

const stoppers = []
let stopping = false
async function stopAll(code = 0) {
  if (stopping) return
  stopping = true
  console.log('\n• stopping…')
  for (const stop of stoppers.reverse()) {
    try {
      await stop()
    }
    catch (error) {
      console.error(error.message)
    }
  }
  process.exit(code)
}
process.on('SIGINT', () => stopAll(0))
process.on('SIGTERM', () => stopAll(0))

try {
  // The nightly backup (HOOPWISE_BACKUP_AT; off unless set): its settings are checked before anything starts.
  const backups = backupSettings(setupEnv)
  ensureDir(join(ROOT, '.local'))
  let cluster
  if (!setupEnv.NUXT_DATABASE_URL) {
    cluster = startPostgres({ dir: DEV.pgDir, port: DEV.pgPort, database: DEV.database })
    stoppers.push(cluster.stop)
    console.log(`• PostgreSQL on 127.0.0.1:${DEV.pgPort}`)
  }

  let mailNote = 'real SMTP from the environment'
  if (!useRealSmtp) {
    const mail = await startMailCatcher({ smtpPort: DEV.smtpPort, webPort: DEV.mailWebPort, mailDir: DEV.mailDir })
    stoppers.push(mail.stop)
    mailNote = `mail catcher: http://127.0.0.1:${DEV.mailWebPort}`
  }

  if (!useRealPayments) {
    const payments = await startPaymentFake({ port: DEV.paymentFakePort, ...PAYMENT_FAKE_KEYS, webhookUrl: `http://127.0.0.1:${DEV.appPort}/api/dues/webhook` })
    stoppers.push(() => payments.stop())
    mailNote += `; test payment page: http://127.0.0.1:${DEV.paymentFakePort}`
  }

  const { databaseUrl, ownerUrl, seeded } = await setUpDatabase({ env: setupEnv, cluster, publicUrl })

  const env = {
    ...fileEnv,
    NUXT_DATABASE_URL: databaseUrl,
    // The owner's address is for migrations only: the server never gets it.
    NUXT_DATABASE_OWNER_URL: '',
    NUXT_PUBLIC_URL: publicUrl,
    ...(useRealSmtp ? {} : { NUXT_SMTP_HOST: '127.0.0.1', NUXT_SMTP_PORT: String(DEV.smtpPort) }),
    ...(useRealPayments
      ? {}
      : {
          NUXT_PAYMENTS_SECRET_KEY: PAYMENT_FAKE_KEYS.secretKey,
          NUXT_PAYMENTS_WEBHOOK_SECRET: PAYMENT_FAKE_KEYS.webhookSecret,
          NUXT_PAYMENTS_API_HOST: '127.0.0.1',
          NUXT_PAYMENTS_API_PORT: String(DEV.paymentFakePort),
          NUXT_PAYMENTS_API_PROTOCOL: 'http',
        }),
    PORT: String(DEV.appPort),
  }
  let server
  if (dev) {
    server = startProcess(join(ROOT, 'node_modules/.bin/nuxt'), ['dev', '--port', String(DEV.appPort)], { cwd: ROOT, env, name: 'nuxt dev' })
  }
  else {
    console.log('• building the production server (nuxt build)…')
    const build = spawnSync(join(ROOT, 'node_modules/.bin/nuxt'), ['build'], { cwd: ROOT, stdio: 'inherit', env: { ...process.env, ...env } })
    if (build.status !== 0) throw new Error('nuxt build failed')
    server = startProcess(process.execPath, [join(ROOT, '.output/server/index.mjs')], { cwd: ROOT, env, name: 'server' })
  }
  stoppers.push(() => server.stop())
  server.once('exit', code => stopAll(code ?? 0))
  await waitForHttp(`http://127.0.0.1:${DEV.appPort}/api/health`, 180_000)
  if (backups.at) stoppers.push(scheduleNightlyBackups({ at: backups.at, env: { ...setupEnv, NUXT_DATABASE_URL: databaseUrl, NUXT_DATABASE_OWNER_URL: ownerUrl } }))

  const demo = seeded
    ? `
  Demo sign-ins (password: hoopwise-demo)
    member@hoopwise.example       member
    instructor@hoopwise.example   member, instructor
    safety@hoopwise.example       member, instructor, safety officer
    admin@hoopwise.example        member, admin
`
    : ''
  const stops = `the server${useRealSmtp ? '' : ', the mail catcher'}${cluster ? ' and PostgreSQL; the data is kept in .local/' : ''}`
  console.log(`
  Hoopwise is running at ${publicUrl.replace(/\/$/, '')}/   (${mailNote})
${demo}
  Ctrl-C stops ${stops}.
`)
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  await stopAll(1)
}
