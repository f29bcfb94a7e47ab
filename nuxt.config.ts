// Nuxt configuration: root layout (no app/ folder), Tailwind, Pinia, sealed-cookie sessions.
import { SCRYPT_OPTIONS } from './server/services/accounts/password-hashing'
import { fillPageManifestTransform, rememberClientManifest } from './service-worker/precache'

/** A quoted keyword of a content security policy: q('self') → "'self'". */
const q = (keyword: string) => `'${keyword}'`

export default defineNuxtConfig({
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'nuxt-auth-utils', '@nuxt/eslint', 'nuxt-security', '@vite-pwa/nuxt'],
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
    // Sessions end this many days after sign-in (absolute) or after the last request (idle).
    sessionMaxAgeDays: 30,
    sessionIdleDays: 7,
    // Sign-in failures one address may make against one account in a window (a hard stop).
    loginMaxPerAccountAddress: 5,
    // After loginMaxPerAccount failures in a row, each try waits this long, doubling up to the maximum.
    loginBackoffBaseSeconds: 30,
    loginBackoffMaxSeconds: 900,
    // How long a browser that signed in stays known to the account (skips the account's wait).
    knownDeviceDays: 180,
    // Reverse proxies (addresses or CIDR ranges, comma-separated) whose X-Forwarded-For is believed.
    trustedProxies: '',
    // Verification and guardian-consent e-mails one address may receive in a day.
    mailMaxPerRecipientPerDay: 5,
    // The site's public address (NUXT_PUBLIC_URL): its origin is "this site" for requests that change
    // something, and an https address turns on HSTS.
    publicUrl: '',
    // SMTP timeouts (ms) and the notice queue's lease (s; 0 = sized from the timeouts); tests shrink them.
    smtpConnectionTimeoutMs: 10_000,
    smtpGreetingTimeoutMs: 10_000,
    smtpSocketTimeoutMs: 20_000,
    noticeLeaseSeconds: 0,
    // Password hashes (32 MiB each) running at once, and how many more may wait before a 503.
    passwordHashConcurrency: 2,
    passwordHashMaxWaiting: 64,
    // Seconds the audit desk reuses an answer (it reads the whole club); 0 = always fresh.
    // Where uploaded photos are kept (NUXT_UPLOADS_DIR), outside the web root; relative to the working directory.
    uploadsDir: '.local/uploads',
    // The card-payment service (dues): the secret key and the webhook endpoint's secret; host, port and
    // protocol only to point the SDK at the local payment fake (empty: the real service).
    paymentsSecretKey: '',
    paymentsWebhookSecret: '',
    paymentsApiHost: '',
    paymentsApiPort: '',
    paymentsApiProtocol: '',
    // Roster imports: the lease (s) a server holds a running import for, renewed with every batch, and
    // how often (s) a server looks for an import whose server stopped (0 = only at boot and on request).
    importLeaseSeconds: 60,
    importSweepSeconds: 30,
    // Sent to the browser: the site's public address again (the same NUXT_PUBLIC_URL), for og:url.
    public: { url: '' },
  },
  // The launch-side fill page is a client-rendered shell: its HTML holds no personal data, so the
  // fill page's service worker may keep it (with its own nonce and policy) for the field (decision 0050).
  routeRules: { '/events/*/fill': { ssr: false } },
  compatibilityDate: '2025-07-15',
  nitro: {
    experimental: { tasks: true },
    scheduledTasks: { '*/10 * * * *': ['notices:run'] },
    // The build writes .br and .gz beside each public asset; Nitro serves the one the browser accepts.
    compressPublicAssets: { gzip: true, brotli: true },
  },
  typescript: { strict: true },
  hooks: { 'build:manifest': manifest => rememberClientManifest(manifest) },
  // nuxt-auth-utils' hashPassword/verifyPassword with THE parameters too (the server itself uses services/accounts/passwords.ts).
  auth: { hash: { scrypt: { ...SCRYPT_OPTIONS } } },
  eslint: { config: { stylistic: { semi: false, quotes: 'single', commaDangle: 'always-multiline' } } },
  // The fill page's own service worker (service-worker/fill-sw.js), registered only by that page: it
  // keeps the shell, that page's scripts and styles, the font, the icons and the club's public key.
  pwa: {
    strategies: 'injectManifest',
    srcDir: 'service-worker',
    filename: 'fill-sw.js',
    injectRegister: false,
    client: { registerPlugin: false, installPrompt: false, periodicSyncForUpdates: 0 },
    registerWebManifestInRouteRules: true,
    manifest: {
      name: 'Hoopwise fill page',
      short_name: 'Hoopwise',
      description: 'The launch-side fill page: who may fill what, with or without a signal.',
      lang: 'en',
      start_url: '/events',
      scope: '/events/',
      display: 'standalone',
      background_color: '#f6f3ea',
      theme_color: '#1f5a4b',
      icons: [
        { src: '/icons/hoopwise-192.png', sizes: '192x192', type: 'image/png' },
        { src: '/icons/hoopwise-512.png', sizes: '512x512', type: 'image/png' },
        { src: '/icons/hoopwise-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
      ],
    },
    injectManifest: {
      globPatterns: ['_nuxt/**/*.{js,css,woff2,json}', 'icons/*.png', 'favicon.svg', 'manifest.webmanifest'],
      manifestTransforms: [fillPageManifestTransform],
    },
  },
  // Headers only: the project's own guard (server/middleware/0.request-guard.ts) bounds bodies, checks
  // media types and other sites' requests; sign-in has its own limits. nuxt-security's rate limiter,
  // size limiter and XSS validator would buffer bodies, throttle the load tests and refuse "> 10 bar".
  security: {
    rateLimiter: false,
    requestSizeLimiter: false,
    xssValidator: false,
    corsHandler: false,
    allowedMethodsRestricter: false,
    removeLoggers: false,
    nonce: true,
    headers: {
      contentSecurityPolicy: {
        'default-src': [q('self')],
        'base-uri': [q('none')],
        'connect-src': [q('self')],
        'font-src': [q('self')],
        'form-action': [q('self')],
        'frame-ancestors': [q('none')],
        'img-src': [q('self'), 'data:'],
        'object-src': [q('none')],
        'script-src': [q('self'), q('strict-dynamic'), q('nonce-{{nonce}}')],
        'script-src-attr': [q('none')],
        // Vue's style bindings and transitions write inline styles; scripts are what the policy guards.
        'style-src': [q('self'), q('unsafe-inline')],
        'upgrade-insecure-requests': false,
      },
      // Same-origin requests keep their Origin header (no-referrer would send "null" on every POST).
      referrerPolicy: 'same-origin',
      xFrameOptions: 'DENY',
      // HSTS is sent by the request guard, only when NUXT_PUBLIC_URL is https (known at run time).
      strictTransportSecurity: false,
      permissionsPolicy: {
        // The fill station scans QR codes with this site's camera; no other site's frame may use it.
        'camera': ['self'],
        'display-capture': [],
        'fullscreen': [],
        'geolocation': [],
        'microphone': [],
      },
    },
  },
})
