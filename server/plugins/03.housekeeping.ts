import { housekeeping, reconcilePayments } from '../services/bookings'

/** Every 30 s: release lapsed holds and stale waitlist offers; reconcile checkouts whose webhook never came. */
export default defineNitroPlugin((nitro) => {
  const tick = async () => {
    try {
      await dbReady()
      await housekeeping(useDb(), bookingConfig())
      if (useRuntimeConfig().stripe.secretKey) await reconcilePayments(useDb(), useStripe(), bookingConfig())
    } catch (e) {
      console.error('[umbrafield] housekeeping:', (e as Error).message)
    }
  }
  const timer = setInterval(tick, Number(process.env.UMBRAFIELD_HOUSEKEEPING_MS || 30_000))
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
