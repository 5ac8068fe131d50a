import { housekeeping } from '../services/bookings'
import { processRefunds, reconcileLedger, reconcilePayments } from '../services/money'

/**
 * Every 30 s: release lapsed holds and stale waitlist offers, reconcile checkouts whose webhook never
 * came, send refunds that are due (new ones and retries). Once a day: compare every booking's ledger
 * with what Stripe holds.
 */
const DAY_MS = 24 * 3600_000
export default defineNitroPlugin((nitro) => {
  let lastLedgerRun = 0
  const tick = async () => {
    try {
      await dbReady()
      await housekeeping(useDb(), bookingConfig())
      if (!useRuntimeConfig().stripe.secretKey) return
      await reconcilePayments(useDb(), useStripe(), bookingConfig())
      await processRefunds(useDb(), useStripe(), bookingConfig())
      if (Date.now() - lastLedgerRun > Number(process.env.UMBRAFIELD_LEDGER_RECONCILE_MS || DAY_MS)) {
        lastLedgerRun = Date.now()
        await reconcileLedger(useDb(), useStripe())
      }
    } catch (e) {
      console.error('[umbrafield] housekeeping:', (e as Error).message)
    }
  }
  const timer = setInterval(tick, Number(process.env.UMBRAFIELD_HOUSEKEEPING_MS || 30_000))
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
