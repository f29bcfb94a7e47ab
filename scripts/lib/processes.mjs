// Child processes started by the scripts and the tests: spawned, awaited, and always stopped.
import { spawn } from 'node:child_process'
import { mkdirSync } from 'node:fs'
import { connect } from 'node:net'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'

const projectRoot = join(dirname(fileURLToPath(import.meta.url)), '..', '..')

/**
 * Throws when something already listens on 127.0.0.1:`port`: a server left by an interrupted run
 * would otherwise answer the health check, and a test or benchmark would run against the old build.
 */
export async function ensurePortFree(port) {
  const taken = await new Promise((resolve) => {
    const socket = connect({ port, host: '127.0.0.1' })
    socket.once('connect', () => {
      socket.destroy()
      resolve(true)
    })
    socket.once('error', () => resolve(false))
  })
  if (taken) throw new Error(`port ${port} is taken: a server from an interrupted run may still be up (stop it, or move the ports with HOOPWISE_TEST_PORT_OFFSET)`)
}

/** Polls `url` until it answers (any HTTP status) or `timeoutMs` passes. */
export async function waitForHttp(url, timeoutMs = 60_000, okOnly = false) {
  const deadline = Date.now() + timeoutMs
  let lastError
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url)
      if (!okOnly || res.ok) return res
    }
    catch (error) { lastError = error }
    await new Promise(r => setTimeout(r, 250))
  }
  throw new Error(`${url} did not answer within ${timeoutMs} ms (${lastError?.message ?? 'no answer'})`)
}

/**
 * Spawns a long-running child; returns it with a stop() that resolves when it has exited.
 * @returns {import('node:child_process').ChildProcess & { stop: () => Promise<void>, recentStderr: () => string, label: string }}
 */
export function startProcess(command, args, { env = {}, cwd, name, quiet = false } = {}) {
  const child = spawn(command, args, {
    cwd,
    env: { ...process.env, ...env },
    stdio: quiet ? ['ignore', 'ignore', 'pipe'] : ['ignore', 'inherit', 'inherit'],
  })
  let stderr = ''
  child.stderr?.on('data', (d) => {
    stderr = (stderr + d).slice(-4000)
  })
  const exited = new Promise(resolve => child.once('exit', resolve))
  child.stop = async () => {
    if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM')
    const timer = setTimeout(() => child.kill('SIGKILL'), 5000)
    await exited
    clearTimeout(timer)
  }
  child.label = name ?? command
  child.recentStderr = () => stderr
  return child
}

/** Starts the maildev mail catcher (SMTP and web/REST on 127.0.0.1), keeping mail in `mailDir`. */
export async function startMailCatcher({ smtpPort, webPort, mailDir, quiet = true }) {
  mkdirSync(mailDir, { recursive: true })
  const bin = join(projectRoot, 'node_modules/maildev/dist/bin/maildev.js')
  const child = startProcess(process.execPath, [bin, '--ip', '127.0.0.1', '--web-ip', '127.0.0.1',
    '-s', String(smtpPort), '-w', String(webPort), '--mail-directory', mailDir, '--silent'], { name: 'maildev', quiet })
  await waitForHttp(`http://127.0.0.1:${webPort}/api/email`, 30_000, true)
  return child
}

/**
 * Starts the payment fake (scripts/payment-fake, a test double of the card-payment service) on
 * 127.0.0.1:`port`, delivering its webhooks to `webhookUrl`; waits until it answers.
 */
export async function startPaymentFake({ port, secretKey, webhookSecret, webhookUrl, quiet = true }) {
  const child = startProcess(process.execPath, [join(projectRoot, 'scripts/payment-fake/server.mjs')], {
    env: { PAYMENT_FAKE_PORT: String(port), PAYMENT_FAKE_SECRET_KEY: secretKey, PAYMENT_FAKE_WEBHOOK_SECRET: webhookSecret, PAYMENT_FAKE_WEBHOOK_URL: webhookUrl },
    name: 'payment fake',
    quiet,
  })
  await waitForHttp(`http://127.0.0.1:${port}/health`, 30_000, true)
  return child
}

/** Starts the built production server (.output) on `port` with `env`; waits until /api/health answers. */
export async function startAppServer({ root, port, env, quiet = true }) {
  await ensurePortFree(port)
  const child = startProcess(process.execPath, [join(root, '.output/server/index.mjs')], {
    cwd: root,
    env: { ...env, PORT: String(port), HOST: '127.0.0.1', NITRO_PORT: String(port), NITRO_HOST: '127.0.0.1' },
    name: 'server',
    quiet,
  })
  try {
    await waitForHttp(`http://127.0.0.1:${port}/api/health`, 60_000)
  }
  catch (error) {
    await child.stop()
    throw new Error(`${error.message}\n${child.recentStderr()}`, { cause: error })
  }
  return child
}
