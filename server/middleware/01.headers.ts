import { randomBytes } from 'node:crypto'

/**
 * Security headers on every response, pages and API alike.
 * CSP: everything from this origin; MapLibre needs blob: workers and images, and the countdown's
 * service worker is /sw.js ('self'). Inline scripts run only with this response's nonce: a fresh one
 * per request (event.context.cspNonce), which server/plugins/06.csp-nonce.ts writes on the scripts
 * Nuxt itself puts in the page (its config and payload), and no inline script an attacker might get
 * into the page could know. frame-ancestors 'none' forbids framing.
 * HSTS only when the app is served over HTTPS (directly, or behind a proxy that says so).
 */
const cspWithNonce = (nonce: string) => [
  "default-src 'self'",
  `script-src 'self' 'nonce-${nonce}'`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self' data:",
  "worker-src 'self' blob:",
  "child-src 'self' blob:",
  "connect-src 'self'",
  "object-src 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join('; ')

export default defineEventHandler((event) => {
  const nonce = randomBytes(16).toString('base64')
  event.context.cspNonce = nonce
  setResponseHeaders(event, {
    'Content-Security-Policy': cspWithNonce(nonce),
    'X-Content-Type-Options': 'nosniff',
    'X-Frame-Options': 'DENY',
    'Referrer-Policy': 'same-origin',
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Permissions-Policy': 'camera=(), microphone=(), payment=(), geolocation=(self)',
  })
  const https = getRequestProtocol(event, { xForwardedProto: trustedProxy(event) }) === 'https'
  if (https) setResponseHeader(event, 'Strict-Transport-Security', 'max-age=31536000; includeSubDomains')
})
