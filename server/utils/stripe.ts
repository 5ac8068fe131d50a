import Stripe from 'stripe'

let client: Stripe | undefined

/**
 * The official Stripe SDK. Demo and tests point it at the local fake through NUXT_STRIPE_API_HOST,
 * _PORT and _PROTOCOL; with real keys and those unset, it talks to Stripe itself.
 */
export function useStripe(): Stripe {
  const c = useRuntimeConfig().stripe
  if (!c.secretKey) throw createError({ statusCode: 503, statusMessage: 'Payments are not configured', message: 'Set NUXT_STRIPE_SECRET_KEY to take payments' })
  client ??= new Stripe(c.secretKey, {
    maxNetworkRetries: 2,
    ...(c.apiHost ? { host: c.apiHost, port: Number(c.apiPort) || undefined, protocol: (c.apiProtocol || 'https') as 'http' | 'https' } : {}),
  })
  return client
}
