// Nuxt configuration: root layout (no app/ folder), Tailwind, Pinia, sealed-cookie sessions.
import { SCRYPT_OPTIONS } from './server/services/password-hashing'

export default defineNuxtConfig({
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'nuxt-auth-utils', '@nuxt/eslint'],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Hoopwise',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'Club office, training log and fill-safety desk for water rocketry clubs' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  css: ['~/assets/css/main.css'],
  runtimeConfig: {
    databaseUrl: '',
    smtpHost: '127.0.0.1',
    smtpPort: 1025,
    smtpUser: '',
    smtpPass: '',
    smtpSecure: false,
    mailFrom: 'Hoopwise <office@hoopwise.example>',
    // Sign-in rate limits; tests of their own raise or lower these.
    loginMaxPerAccount: 5,
    loginMaxPerAddress: 20,
    loginWindowSeconds: 900,
    // Sign-ups and password-reset requests allowed per address in an hour.
    signupMaxPerAddress: 10,
    resetRequestMaxPerAddress: 10,
    // Password hashes (32 MiB each) running at once, and how many more may wait before a 503.
    passwordHashConcurrency: 2,
    passwordHashMaxWaiting: 64,
  },
  compatibilityDate: '2025-07-15',
  nitro: {
    experimental: { tasks: true },
    scheduledTasks: { '*/10 * * * *': ['notices:run'] },
  },
  typescript: { strict: true },
  // nuxt-auth-utils' hashPassword/verifyPassword with THE parameters too (the server itself uses services/passwords.ts).
  auth: { hash: { scrypt: { ...SCRYPT_OPTIONS } } },
  eslint: { config: { stylistic: { semi: false, quotes: 'single', commaDangle: 'always-multiline' } } },
})
