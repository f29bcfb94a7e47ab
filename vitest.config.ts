import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vitest/config'

// Nuxt's aliases as the suites see them: `~~` (the project root, for stores and composables) and
// `#shared` (how server code imports the root `shared/` folder).
const alias = {
  '~~': fileURLToPath(new URL('.', import.meta.url)),
  '#shared': fileURLToPath(new URL('./shared', import.meta.url)),
}

// Three suites. `unit` needs nothing running; `api` and `e2e` share one built server started by
// tests/support/global-setup.ts (PostgreSQL and the mail catcher are started by scripts/test.mjs).
export default defineConfig({
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'],
          // Each password hash costs about a third of a second alone and several times that while the
          // suites share two cores; tests that sign in or reset many times need the room.
          testTimeout: 60_000,
          hookTimeout: 120_000,
          maxWorkers: 2,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: false,
          // A sign-in's password check alone can take over a second on a busy machine (scrypt at OWASP's cost).
          expect: { poll: { timeout: 10_000 } },
        },
      },
    ],
  },
})
