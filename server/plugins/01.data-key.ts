import { keyRing } from '../services/sealed'

/**
 * The data key (NUXT_DATA_KEY) seals personal data and secrets at rest (server/services/sealed.ts).
 * In production it must be set: refuse to start, as for the session secret. The demo (and the tests,
 * which seed it) may go without: the key is then derived from the session secret. `npm run demo`
 * generates one beside the session secret and passes it in.
 *
 * Named to run after the session secret (00.*) and before the database opens (01.database), which
 * may seal while migrating.
 */
export default defineNitroPlugin(() => {
  const demo = useRuntimeConfig().seed === 'demo'
  if (!process.env.NUXT_DATA_KEY && process.env.NODE_ENV === 'production' && !demo) {
    console.error('[umbrafield] NUXT_DATA_KEY is missing. Set it to 32 random bytes (base64 or 64 hex digits, e.g. `openssl rand -base64 32`) and start again; it encrypts passports, medical notes and phone numbers at rest.')
    process.exit(1)
  }
  try {
    keyRing()
  } catch (e) {
    // A malformed key (wrong length, a bad NUXT_DATA_KEYS_PREVIOUS) would fail every seal later: say so now.
    console.error(`[umbrafield] ${(e as Error).message}`)
    process.exit(1)
  }
})
