import { processRefunds, reconcileLedger, reconcilePayments } from '../../services/money'

/** Organisers run the reconciliation now: pending checkouts, due refunds, then the ledger against Stripe. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const db = useDb(), stripe = useStripe(), cfg = bookingConfig()
  await reconcilePayments(db, stripe, cfg, 0)
  await processRefunds(db, stripe, cfg, { limit: 200 })
  return reconcileLedger(db, stripe)
})
