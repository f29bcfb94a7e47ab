import type { TestProject } from 'vitest/node'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT } from '../../scripts/lib/config.mjs'
import { testEnv, serverEnv, DEMO, DEMO_ROLES, type DemoRole } from './test-env'

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    /** Session cookies of the four demo accounts, signed in once for the whole run. */
    cookies: Record<DemoRole, string>
  }
}

/** Signs in once and returns the session cookie ("name=value"). */
export async function signIn(baseUrl: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  })
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${await res.text()}`)
  const cookie = res.headers.getSetCookie().map(c => c.split(';')[0]).find(c => c?.startsWith('nuxt-session='))
  if (!cookie) throw new Error(`sign-in as ${email} set no session cookie`)
  return cookie
}

/** One built server per run, shared by the API and browser suites (the build is made by scripts/test.mjs). */
export default async function setup(project: TestProject) {
  let server: Awaited<ReturnType<typeof startAppServer>> | undefined
  // Both suites name this setup; the first to run starts the server, the second finds it answering.
  const running = await fetch(`${testEnv.baseUrl}/api/health`).then(r => r.ok).catch(() => false)
  if (!running) {
    server = await startAppServer({ root: ROOT, port: testEnv.appPort, env: serverEnv(), quiet: !process.env.HOOPWISE_TEST_VERBOSE })
  }
  const cookies = {} as Record<DemoRole, string>
  for (const role of DEMO_ROLES) cookies[role] = await signIn(testEnv.baseUrl, DEMO[role], DEMO.password)
  project.provide('baseUrl', testEnv.baseUrl)
  project.provide('cookies', cookies)
  return async () => {
    await server?.stop()
  }
}
