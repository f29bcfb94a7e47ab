#!/usr/bin/env node
// `npm test`: the same set-up as `npm start` on its own cluster, database and ports, then lint,
// type-check, unit, build, API and browser tests. Exits non-zero on any failure; stops what it started.
import { execFileSync, spawnSync } from 'node:child_process'
import { existsSync, readFileSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { userInfo } from 'node:os'
import { ROOT, TEST, PAYMENT_FAKE_KEYS, ensureDir, ensureDependencies } from './lib/config.mjs'

const CHROMIUM = '/usr/bin/chromium'
// `npm test -- api` runs one stage after the set-up; `npm test -- api tests/api/sessions.test.ts` also
// narrows the suites to the named files.
const args = process.argv.slice(2)
const only = args.filter(a => !a.includes('/'))
const files = args.filter(a => a.includes('/'))

function run(label, command, args, env = {}) {
  console.log(`\n▶ ${label}`)
  const result = spawnSync(command, args, { cwd: ROOT, stdio: 'inherit', env: { ...process.env, ...env } })
  if (result.status !== 0) throw new Error(`${label} failed (exit ${result.status ?? result.signal})`)
}

ensureDependencies()
if (!existsSync(CHROMIUM)) {
  if (userInfo().uid !== 0) {
    console.error(`✖ Chromium is missing for the browser tests. Install it with: sudo apt-get install -y chromium`)
    process.exit(1)
  }
  console.log('• installing Chromium (Debian package chromium)…')
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' })
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
}

const { startPostgres, recreateDatabase, APP_ROLE } = await import('./lib/postgres.mjs')
const { startMailCatcher, startPaymentFake } = await import('./lib/processes.mjs')
const { prepareDatabase } = await import('./lib/database.mjs')

const stoppers = []
let exitCode = 0
const RESULTS = join(ROOT, '.local', 'test', 'results')
const tally = { passed: 0, failed: 0, skipped: 0 }

/** Runs one Vitest project, keeping its JSON report so the run can close on one count line. */
function vitest(label, project) {
  const report = join(RESULTS, `${project}.json`)
  rmSync(report, { force: true })
  try {
    const mine = files.filter(f => f.includes(`tests/${project}/`))
    if (files.length && !mine.length) return
    run(label, 'npx', ['vitest', 'run', '--project', project, '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...mine])
  }
  finally {
    if (existsSync(report)) {
      const r = JSON.parse(readFileSync(report, 'utf8'))
      tally.passed += r.numPassedTests
      tally.failed += r.numFailedTests
      tally.skipped += r.numPendingTests + r.numTodoTests
    }
  }
}

const stages = {
  prepare: () => run('generate types (nuxt prepare)', 'npx', ['nuxt', 'prepare']),
  lint: () => run('lint (eslint)', 'npx', ['eslint', '.']),
  typecheck: () => run('type-check (vue-tsc)', 'npx', ['vue-tsc', '-b', '--noEmit']),
  unit: () => vitest('unit tests', 'unit'),
  build: () => run('build (nuxt build)', 'npx', ['nuxt', 'build']),
  api: () => vitest('API tests', 'api'),
  e2e: () => vitest('browser tests', 'e2e'),
}
try {
  ensureDir(RESULTS)
  const pg = startPostgres({ dir: TEST.pgDir, port: TEST.pgPort, database: 'postgres', fast: true })
  stoppers.push(pg.stop)
  recreateDatabase({ port: TEST.pgPort, database: TEST.database })
  const databaseUrl = `postgres://hoopwise@127.0.0.1:${TEST.pgPort}/${TEST.database}`
  // Migrated as the owner; the test server connects as the application role (tests/support/test-env.ts).
  const appDatabaseUrl = `postgres://${APP_ROLE}@127.0.0.1:${TEST.pgPort}/${TEST.database}`
  await prepareDatabase({ databaseUrl: appDatabaseUrl, ownerUrl: databaseUrl, publicUrl: `http://127.0.0.1:${TEST.appPort}` })
  const mail = await startMailCatcher({ smtpPort: TEST.smtpPort, webPort: TEST.mailWebPort, mailDir: TEST.mailDir })
  stoppers.push(() => mail.stop())
  const payments = await startPaymentFake({ port: TEST.paymentFakePort, ...PAYMENT_FAKE_KEYS, webhookUrl: `http://127.0.0.1:${TEST.appPort}/api/dues/webhook` })
  stoppers.push(() => payments.stop())

  for (const [name, stage] of Object.entries(stages)) {
    if (only.length && !only.includes(name)) continue
    stage()
  }
  console.log('\n✔ every stage passed')
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  exitCode = 1
}
finally {
  for (const stop of stoppers.reverse()) {
    try {
      await stop()
    }
    catch { /* already stopped */ }
  }
  // One plain closing line with the counts of every suite that ran.
  console.log(`\n${tally.passed} passed, ${tally.failed} failed` + (tally.skipped ? `, ${tally.skipped} skipped` : ''))
}
process.exit(exitCode)
