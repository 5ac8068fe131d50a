/**
 * Security headers on every response, pages and API alike.
 * CSP: everything from this origin; MapLibre needs blob: workers and images; Nuxt's hydration
 * payload is an inline script, hence 'unsafe-inline' for scripts (no third-party origin is allowed,
 * so an injected script could not load anything from elsewhere). frame-ancestors 'none' forbids framing.
 * HSTS only when the app is served over HTTPS (directly, or behind a proxy that says so).
 */
const CSP = [
  "default-src 'self'",
  "script-src 'self' 'unsafe-inline'",
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
  setResponseHeaders(event, {
    'Content-Security-Policy': CSP,
    'X-Content-Type-Options': 'nosniff',
    'X-Frame-Options': 'DENY',
    'Referrer-Policy': 'same-origin',
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Permissions-Policy': 'camera=(), microphone=(), payment=(), geolocation=(self)',
  })
  const https = getRequestProtocol(event, { xForwardedProto: trustedProxy(event) }) === 'https'
  if (https) setResponseHeader(event, 'Strict-Transport-Security', 'max-age=31536000; includeSubDomains')
})
