#!/usr/bin/env node
// `npm run admin:create -- --email you@club.example --club "Club name"`: the first admin of a database
// without the demo club. Creates the club when missing, the account and an active admin membership.
// The password is asked on the terminal (hidden), read from stdin with --password-stdin, or chosen by
// the new admin from a one-time link e-mailed through the notice queue with --send-link.
import { randomBytes } from 'node:crypto'
import { parseArgs } from 'node:util'
import { createJiti } from 'jiti'
import { DEV, JITI_OPTIONS, loadDotEnv } from './lib/config.mjs'
import { APP_ROLE, OWNER_ROLE } from './lib/postgres.mjs'
import { makePasswordHasher, prepareDatabase } from './lib/database.mjs'
import { databaseUrls } from './lib/setup.mjs'

const MIN_PASSWORD = 12
const MAX_PASSWORD = 200
const USAGE = `Usage: npm run admin:create -- --email you@club.example --club "Club name" [options]

  --name "Full name"     the admin's name (default: the part of the e-mail before @)
  --send-link            e-mail a one-time link to choose the password (the running server sends it)
  --password-stdin       read the password from standard input instead of asking
  --time-zone Area/City  a new club's time zone (default: this machine's)
  --tag-prefix ABC       a new club's tag prefix, 2-5 capital letters (default: the name's initials)
  --units bar|psi        a new club's pressure unit (default: bar)
  --public-url URL       a new club's public address (default: NUXT_PUBLIC_URL)

The database is NUXT_DATABASE_OWNER_URL (or NUXT_DATABASE_URL) from the environment or .env;
without either, the private cluster of a running \`npm start\`.`

const jiti = createJiti(import.meta.url, JITI_OPTIONS)

/** Reads one line from the terminal without echoing it. */
function askHidden(question) {
  const { stdin, stdout } = process
  stdout.write(question)
  stdin.setRawMode(true)
  stdin.setEncoding('utf8')
  stdin.resume()
  return new Promise((resolve, reject) => {
    let value = ''
    const finish = () => {
      stdin.off('data', onData)
      stdin.setRawMode(false)
      stdin.pause()
      stdout.write('\n')
    }
    function onData(chunk) {
      for (const ch of chunk) {
        if (ch === '\r' || ch === '\n') return finish(), resolve(value)
        if (ch === '\u0003' || ch === '\u0004') return finish(), reject(new UsageError('Cancelled.'))
        if (ch === '\u007f' || ch === '\b') value = value.slice(0, -1)
        else if (ch >= ' ') value += ch
      }
    }
    stdin.on('data', onData)
  })
}

/** Everything on standard input, without the one line break that ends it. */
async function readStdin() {
  let text = ''
  for await (const chunk of process.stdin) text += chunk
  return text.replace(/\r?\n$/, '')
}

/** The password: from stdin, or asked twice on the terminal; refused when too short or too long. */
async function choosePassword(fromStdin) {
  let password
  if (fromStdin) password = await readStdin()
  else if (process.stdin.isTTY) {
    password = await askHidden(`New password (at least ${MIN_PASSWORD} characters): `)
    if (password.length >= MIN_PASSWORD && await askHidden('The same again: ') !== password) throw new UsageError('The two passwords differ.')
  }
  else throw new UsageError('No terminal to ask for a password: use --password-stdin or --send-link.')
  if (password.length < MIN_PASSWORD) throw new UsageError(`The password needs at least ${MIN_PASSWORD} characters.`)
  if (password.length > MAX_PASSWORD) throw new UsageError(`The password may have at most ${MAX_PASSWORD} characters.`)
  // The same common-password list the sign-up and reset routes refuse.
  const { isCommonPassword, COMMON_PASSWORD_MESSAGE } = await jiti.import('../server/services/accounts/passwords.ts')
  if (isCommonPassword(password)) throw new UsageError(COMMON_PASSWORD_MESSAGE)
  return password
}

class UsageError extends Error {}

async function main() {
  const { values: opts } = parseArgs({
    options: {
      'email': { type: 'string' },
      'club': { type: 'string' },
      'name': { type: 'string' },
      'send-link': { type: 'boolean', default: false },
      'password-stdin': { type: 'boolean', default: false },
      'time-zone': { type: 'string' },
      'tag-prefix': { type: 'string' },
      'units': { type: 'string', default: 'bar' },
      'public-url': { type: 'string' },
      'help': { type: 'boolean', default: false },
    },
  })
  if (opts.help) return console.log(USAGE)
  const { emailField } = await jiti.import('../shared/schemas/common.ts')
  const email = emailField.safeParse(opts.email ?? '')
  if (!email.success) throw new UsageError(`--email: ${email.error.issues[0].message}.`)
  const clubName = opts.club?.trim()
  if (!clubName || clubName.length > 200) throw new UsageError('--club: the club\'s name (1-200 characters).')
  const name = (opts.name ?? email.data.split('@')[0]).trim()
  if (!name || name.length > 120) throw new UsageError('--name: 1-120 characters.')
  if (opts['send-link'] && opts['password-stdin']) throw new UsageError('Choose --send-link or --password-stdin, not both.')
  if (!['bar', 'psi'].includes(opts.units)) throw new UsageError('--units: bar or psi.')
  if (opts['tag-prefix'] !== undefined && !/^[A-Z]{2,5}$/.test(opts['tag-prefix'])) throw new UsageError('--tag-prefix: 2-5 capital letters.')
  const timeZone = opts['time-zone'] ?? Intl.DateTimeFormat().resolvedOptions().timeZone ?? 'UTC'
  try {
    new Intl.DateTimeFormat('en', { timeZone })
  }
  catch {
    throw new UsageError(`--time-zone: ${timeZone} is not a time zone (try Europe/London).`)
  }

  const env = { ...loadDotEnv(), ...process.env }
  const publicUrl = opts['public-url'] ?? env.NUXT_PUBLIC_URL ?? `http://localhost:${DEV.appPort}`
  if (!/^https?:\/\//.test(publicUrl)) throw new UsageError('--public-url: an http:// or https:// address.')
  const privateCluster = {
    ownerUrl: `postgres://${OWNER_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`,
    appUrl: `postgres://${APP_ROLE}@127.0.0.1:${DEV.pgPort}/${DEV.database}`,
  }
  const { databaseUrl, ownerUrl } = databaseUrls({ env, cluster: privateCluster })

  const password = opts['send-link'] ? randomBytes(32).toString('base64url') : await choosePassword(opts['password-stdin'])
  const passwordHash = await makePasswordHasher()(password)

  // The schema and grants first (idempotent): the command also works before the first `npm start`.
  try {
    await prepareDatabase({ databaseUrl, ownerUrl, publicUrl, seed: false, log: () => {} })
  }
  catch (error) {
    const refused = /ECONNREFUSED|ConnectionRefused/.test(`${error.name} ${error.message} ${error.cause?.message ?? ''}`)
    if (refused && !env.NUXT_DATABASE_URL) {
      throw new UsageError('The private PostgreSQL is not running: start `npm start` first, or set NUXT_DATABASE_URL.')
    }
    throw error
  }
  const { createSequelize } = await jiti.import('../server/models/index.ts')
  const { createFirstAdmin, FirstAdminRefusal } = await jiti.import('../server/database/first-admin.ts')
  const sequelize = createSequelize(ownerUrl)
  try {
    const outcome = await createFirstAdmin(sequelize, {
      email: email.data,
      name,
      clubName,
      tagPrefix: opts['tag-prefix'],
      timeZone,
      units: opts.units,
      publicUrl,
      passwordHash,
      sendLink: opts['send-link'],
    })
    console.log(`✔ ${email.data} is an admin of ${clubName}${outcome.clubCreated ? ' (club created)' : ''}.`)
    if (outcome.linkQueuedTo) {
      console.log(`  A link to choose the password is queued to ${outcome.linkQueuedTo}: the running server sends it`
        + ' within 10 minutes (or soon after it starts). The link works once, for 1 hour.')
    }
    else console.log(`  Sign in at ${publicUrl.replace(/\/$/, '')}/login`)
  }
  catch (error) {
    if (error instanceof FirstAdminRefusal) throw new UsageError(error.message)
    throw error
  }
  finally {
    await sequelize.close()
  }
}

try {
  await main()
}
catch (error) {
  console.error(`✖ ${error.message}`)
  if (!(error instanceof UsageError)) console.error(error.stack)
  process.exit(1)
}
