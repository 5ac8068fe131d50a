/**
 * Cross-origin writes are refused. A state-changing request (POST, PUT, PATCH, DELETE) to the API
 * must come from this app's own origin: its Origin header, or failing that Sec-Fetch-Site, must say
 * so (browsers send one of them on every such request; clients that send neither are not browsers,
 * and cannot carry a victim's cookie). Request bodies must be JSON, or multipart on the upload routes,
 * so no HTML form on another site can post here. Stripe's webhook is exempt: its signature is the check.
 */
const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])
const MULTIPART_ROUTES = [/^\/api\/climatology$/, /^\/api\/workspaces\/\d+\/(sites\/import|terrain)$/]

export default defineEventHandler((event) => {
  const path = event.path.split('?')[0]!
  if (!UNSAFE.has(event.method) || !path.startsWith('/api/') || path === '/api/stripe/webhook') return
  const origin = getRequestHeader(event, 'origin')
  const fetchSite = getRequestHeader(event, 'sec-fetch-site')
  if (origin !== undefined) {
    const allowed = new Set([new URL(useRuntimeConfig(event).public.appUrl).origin, getRequestURL(event, { xForwardedHost: trustedProxy(event), xForwardedProto: trustedProxy(event) }).origin])
    if (!allowed.has(origin)) throw createError({ statusCode: 403, statusMessage: 'Cross-origin request refused', message: 'This request did not come from Umbrafield itself' })
  } else if (fetchSite !== undefined && fetchSite !== 'same-origin' && fetchSite !== 'none') {
    throw createError({ statusCode: 403, statusMessage: 'Cross-origin request refused', message: 'This request did not come from Umbrafield itself' })
  }
  const type = (getRequestHeader(event, 'content-type') ?? '').toLowerCase()
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  const hasBody = length > 0 || getRequestHeader(event, 'transfer-encoding') !== undefined
  if (!hasBody && !type) return
  const multipart = MULTIPART_ROUTES.some((r) => r.test(path))
  if (multipart ? !type.startsWith('multipart/form-data') : !type.startsWith('application/json')) {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported media type', message: multipart ? 'Send the file as multipart/form-data' : 'Send the body as application/json' })
  }
})
