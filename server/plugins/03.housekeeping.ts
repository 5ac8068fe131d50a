import { housekeeping } from '../services/bookings'
import { fetchDueForecasts } from '../services/forecasts'
import { singleFlight, withLease } from '../services/leases'
import { processRefunds, reconcileLedger, reconcilePayments } from '../services/money'
import { pruneRateLimits } from '../utils/rateLimit'
import { queueParticipantReminders } from '../services/people/participantReminders'
import { sendAlertDigests } from '../services/operations/alerts'

/**
 * Every 30 s: release lapsed holds and stale waitlist offers, reconcile checkouts whose webhook never
 * came, send refunds that are due (new ones and retries). Once a day: compare every booking's ledger
 * with what Stripe holds.
 */
const DAY_MS = 24 * 3600_000
export default defineNitroPlugin((nitro) => {
  const everyMs = Number(process.env.UMBRAFIELD_HOUSEKEEPING_MS || 30_000)
  const ledgerEveryMs = Number(process.env.UMBRAFIELD_LEDGER_RECONCILE_MS || DAY_MS)
  // A run still going (many refunds, a slow Stripe) makes the next tick skip, never overlap it.
  const tick = singleFlight(async () => {
    try {
      await dbReady()
      const db = useDb()
      // With several instances on one database, the one holding the lease does the tick. The lease
      // lasts two ticks and is renewed while a run goes on (however long its Stripe calls take), so
      // no other instance starts alongside; a crashed holder is replaced within a minute or so.
      await withLease(db, 'housekeeping', everyMs * 2, async () => {
        await housekeeping(db, bookingConfig())
        await pruneRateLimits(db)
        // Participant details still missing 45 and 14 days before a trip (by the business date).
        await queueParticipantReminders(db, useRuntimeConfig().public.appUrl)
        // Organisers' daily digests: once per organiser per business day (a row per day decides).
        await sendAlertDigests(db, bookingConfig().appUrl)
        if (!useRuntimeConfig().stripe.secretKey) return
        await reconcilePayments(db, useStripe(), bookingConfig())
        await processRefunds(db, useStripe(), bookingConfig())
      })
      // The daily ledger comparison: a lease that lasts the day, so it runs once a day in one instance.
      if (useRuntimeConfig().stripe.secretKey) {
        await withLease(db, 'ledger-reconcile', ledgerEveryMs, () => reconcileLedger(db, useStripe()).then(() => undefined), { renew: false })
      }
    } catch (e) {
      console.error('[umbrafield] housekeeping:', (e as Error).message)
    }
  })
  // Cloud forecasts for trips in their eclipse week: hourly per trip, and once at start-up; its own
  // lease and single flight, so a slow forecast service never holds up the seat and money work.
  let forecastsAtStart = true
  const forecastTick = singleFlight(async () => {
    try {
      await dbReady()
      const ran = await withLease(useDb(), 'forecasts', everyMs * 2, async () => {
        await fetchDueForecasts(useDb(), useRuntimeConfig().forecastApiUrl, { force: forecastsAtStart })
      })
      if (ran) forecastsAtStart = false
    } catch (e) {
      console.error('[umbrafield] forecasts:', (e as Error).message)
    }
  })
  void forecastTick()
  const timer = setInterval(() => { void tick(); void forecastTick() }, everyMs)
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
