import type Stripe from 'stripe'
import { handleStripeEvent } from '../../services/money'

/** Stripe webhooks, verified with the signing secret; replays are idempotent. */
export default defineEventHandler(async (event) => {
  const raw = (await readRawBody(event, 'utf8')) ?? ''
  const signature = getRequestHeader(event, 'stripe-signature') ?? ''
  const stripe = useStripe()
  let ev: Stripe.Event
  try {
    ev = stripe.webhooks.constructEvent(raw, signature, useRuntimeConfig().stripe.webhookSecret)
  } catch {
    throw createError({ statusCode: 400, statusMessage: 'Bad signature', message: 'Webhook signature verification failed' })
  }
  const r = await handleStripeEvent(useDb(), stripe, ev, bookingConfig())
  return { received: true, ...r }
})
