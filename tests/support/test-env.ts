// The services scripts/test.mjs starts for the API and browser suites, read from its environment.
import { join } from 'node:path'
import { LOCAL, PAYMENT_FAKE_KEYS, TEST } from '../../scripts/lib/config.mjs'
import { APP_ROLE } from '../../scripts/lib/postgres.mjs'

export const testEnv = {
  /** The owner role: tests arrange data, add constraints and read what the API cannot show through it. */
  databaseUrl: process.env.HOOPWISE_TEST_DATABASE_URL ?? `postgres://hoopwise@127.0.0.1:${TEST.pgPort}/${TEST.database}`,
  /** The application role the test server connects as (read and append only on the audit trail). */
  appDatabaseUrl: process.env.HOOPWISE_TEST_APP_DATABASE_URL ?? `postgres://${APP_ROLE}@127.0.0.1:${TEST.pgPort}/${TEST.database}`,
  pgPort: TEST.pgPort,
  smtpPort: TEST.smtpPort,
  mailUrl: `http://127.0.0.1:${TEST.mailWebPort}`,
  appPort: TEST.appPort,
  baseUrl: `http://127.0.0.1:${TEST.appPort}`,
  sessionPassword: 'test-session-password-that-is-at-least-32-chars',
  /** The test server's uploads folder (photos), inside the tests' own .local folder. */
  uploadsDir: join(LOCAL, 'test', 'uploads'),
  paymentFakeUrl: `http://127.0.0.1:${TEST.paymentFakePort}`,
  paymentKeys: PAYMENT_FAKE_KEYS,
}

/** The environment every test server gets; isolated servers override ports and services. */
export function serverEnv(overrides: Record<string, string> = {}): Record<string, string> {
  return {
    NODE_ENV: 'production',
    NUXT_SESSION_PASSWORD: testEnv.sessionPassword,
    NUXT_DATABASE_URL: testEnv.appDatabaseUrl,
    NUXT_PUBLIC_URL: testEnv.baseUrl,
    NUXT_SMTP_HOST: '127.0.0.1',
    NUXT_SMTP_PORT: String(testEnv.smtpPort),
    // Every test file signs up and asks for resets from 127.0.0.1; the limits have tests of their own.
    NUXT_SIGNUP_MAX_PER_ADDRESS: '1000',
    NUXT_RESET_REQUEST_MAX_PER_ADDRESS: '1000',
    NUXT_UPLOADS_DIR: testEnv.uploadsDir,
    // The payment SDK talks to the payment fake scripts/test.mjs starts.
    NUXT_PAYMENTS_SECRET_KEY: PAYMENT_FAKE_KEYS.secretKey,
    NUXT_PAYMENTS_WEBHOOK_SECRET: PAYMENT_FAKE_KEYS.webhookSecret,
    NUXT_PAYMENTS_API_HOST: '127.0.0.1',
    NUXT_PAYMENTS_API_PORT: String(TEST.paymentFakePort),
    NUXT_PAYMENTS_API_PROTOCOL: 'http',
    // The audit desk's tests read what they have just written.
    ...overrides,
  }
}

export const DEMO = {
  password: 'hoopwise-demo',
  member: 'member@hoopwise.example',
  instructor: 'instructor@hoopwise.example',
  safety: 'safety@hoopwise.example',
  admin: 'admin@hoopwise.example',
} as const

export type DemoRole = 'member' | 'instructor' | 'safety' | 'admin'
export const DEMO_ROLES: DemoRole[] = ['member', 'instructor', 'safety', 'admin']
