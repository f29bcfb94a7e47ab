#!/usr/bin/env node
// `npm run bench:import`: a benchmark (not a test) of the roster import. One build, a scratch
// PostgreSQL in .local/bench-import (ports from HOOPWISE_TEST_PORT_OFFSET) with the demo club and
// BENCH_MEMBERS invented members; the production server as the application role; the demo admin signed
// in. It uploads a BENCH_ROWS-row roster (semicolons, byte-order mark, Windows line endings; one row in
// ten with a past training record and a tier, one in a hundred refused), runs the dry run, starts the
// import and follows its progress to the end, then imports the same file again (every row found and
// unchanged). Prints the seconds and rows per second of each step (aim: the whole 10 000-row file
// imported in under a minute).
import { availableParallelism, loadavg } from 'node:os'
import { TEST } from './lib/config.mjs'
import { ensureBuild, signInDemoAdmin, startBenchStack } from './lib/bench.mjs'

const ROWS = Number(process.env.BENCH_ROWS ?? 10_000)
const MEMBERS = Number(process.env.BENCH_MEMBERS ?? 2_000)
const REUSE_BUILD = process.env.BENCH_REUSE_BUILD === '1'
// Ports of this benchmark alone (the other benchmarks take pgPort+7…+11 and spareBase+10…+17, +19).
const PG_PORT = TEST.pgPort + 12
const SMTP_PORT = TEST.spareBase + 16
const APP_PORT = TEST.spareBase + 18
const TARGET_SECONDS = 60

/** The roster: ROWS invented members, a tenth with training and a tier, a hundredth with an impossible birth date. */
function roster() {
  const lines = ['Name;E-mail;Phone;Date of birth;Paid until;Roles;Course;Trained on;Trainer;Tier;Tier signed on;Tier assessor']
  for (let i = 0; i < ROWS; i++) {
    const born = i % 100 === 99 ? '31/02/1990' : `${String(1 + (i % 28)).padStart(2, '0')}/${String(1 + (i % 12)).padStart(2, '0')}/${1960 + (i % 40)}`
    const past = i % 10 === 0 ? ';First aid;01/03/2025;Dee Fox;T1;02/03/2025;Dee Fox' : ';;;;;;'
    lines.push(`"Imported, Member ${i}";imported-${i}@bench.hoopwise.example;+44 20 7946 ${String(i % 10000).padStart(4, '0')};${born};31/12/2027;${i % 50 === 0 ? 'Instructor' : ''}${past}`)
  }
  return `\uFEFF${lines.join('\r\n')}\r\n`
}

async function call(baseUrl, cookie, path, init = {}) {
  const res = await fetch(new URL(path, baseUrl), { ...init, headers: { cookie, accept: 'application/json', ...init.headers } })
  const body = await res.json()
  if (res.status >= 300) throw new Error(`${init.method ?? 'GET'} ${path}: ${res.status} ${JSON.stringify(body).slice(0, 400)}`)
  return body
}

const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

let stack
try {
  ensureBuild({ rebuild: !REUSE_BUILD })
  stack = await startBenchStack({ name: 'bench-import', pgPort: PG_PORT, appPort: APP_PORT, smtpPort: SMTP_PORT, members: MEMBERS })
  const { baseUrl } = stack
  const cookie = await signInDemoAdmin(baseUrl)
  const text = roster()
  console.log(`\n${availableParallelism()} CPUs, load average ${load()}; a ${ROWS}-row roster of ${(Buffer.byteLength(text) / 1024 / 1024).toFixed(1)} MB\n`)

  /** Uploads, checks and imports the roster once; the seconds of each step. */
  const importOnce = async (label) => {
    let t = performance.now()
    const form = new FormData()
    form.append('file', new Blob([text], { type: 'text/csv' }), 'roster.csv')
    const job = await call(baseUrl, cookie, '/api/imports', { method: 'POST', body: form })
    const uploadS = (performance.now() - t) / 1000

    t = performance.now()
    const checked = await call(baseUrl, cookie, `/api/imports/${job.id}/dry-run`, {
      method: 'POST', headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ columns: job.suggested, dateFormat: 'dmy' }),
    })
    const dryS = (performance.now() - t) / 1000
    console.log(`• ${label} dry run: ${JSON.stringify(checked.dryRun)}`)

    t = performance.now()
    await call(baseUrl, cookie, `/api/imports/${job.id}/run`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ confirm: true }) })
    let end
    for (;;) {
      end = await call(baseUrl, cookie, `/api/imports/${job.id}`)
      if (['done', 'failed'].includes(end.status)) break
      await new Promise(r => setTimeout(r, 250))
    }
    const runS = (performance.now() - t) / 1000
    if (end.status !== 'done') throw new Error(`the import ended ${end.status}: ${end.error}`)
    console.log(`• ${label} import: ${JSON.stringify(end.progress)}`)
    return { uploadS, dryS, runS }
  }
  const { uploadS, dryS, runS } = await importOnce('first')
  // The same file again: every member found and compared, nothing written (the idempotent path).
  const again = await importOnce('second')
  console.log('')
  const row = (label, s) => console.log(`${label.padEnd(28)} ${s.toFixed(1).padStart(7)} s ${(ROWS / s).toFixed(0).padStart(8)} rows/s`)
  row('upload and preview', uploadS)
  row('dry run (every row checked)', dryS)
  row('import job', runS)
  row('dry run + import', dryS + runS)
  row('again: dry run', again.dryS)
  row('again: import job', again.runS)
  const total = uploadS + dryS + runS
  console.log(`\nload average ${load()} after the run; whole file in ${total.toFixed(1)} s (${total <= TARGET_SECONDS ? 'under' : 'OVER'} the ${TARGET_SECONDS} s aim)`)
  if (total > TARGET_SECONDS) process.exitCode = 1
}
catch (error) {
  console.error(`\n✖ ${error.message}`)
  process.exitCode = 1
}
finally {
  await stack?.stop()
}
