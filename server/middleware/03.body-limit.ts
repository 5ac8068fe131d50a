/**
 * Request bodies are limited while they are read, chunked requests included: 64 KB for JSON, 1 MB
 * for Stripe's webhook, and 26 MB on the upload routes for a signed-in organiser only (role read from
 * the database, before a byte of the body is read); anyone else gets the 64 KB limit there too. At
 * most UPLOADS_AT_ONCE large uploads are read and handled at once per instance; beyond that 503 with
 * Retry-After. The body is read here, once, and handed to h3 (event._requestBody), so no handler can
 * read more than its limit. Over the limit: 413.
 */
const KB = 1024, MB = 1024 * 1024
const JSON_LIMIT = 64 * KB
const UPLOAD_LIMIT = 26 * MB
const UPLOAD_ROUTE = /^\/api\/(climatology|workspaces\/\d+\/(sites\/import|terrain))$/
/** Large uploads (GeoTIFF, CSV) read and parsed at once by one instance; each can hold its 26 MB and more while parsed. */
const UPLOADS_AT_ONCE = Math.max(1, Number(process.env.UMBRAFIELD_UPLOADS_AT_ONCE || 2))
let uploading = 0

/** Whether the caller is a signed-in organiser now: the role and session version from the database, as requireRole reads them. */
async function organiserSignedIn(event: Parameters<typeof getUserSession>[0]): Promise<boolean> {
  const session = await getUserSession(event)
  const id = (session.user as { id?: number } | undefined)?.id
  if (!id) return false
  const user = await useDb().selectFrom('users').select(['role', 'session_version']).where('id', '=', id).executeTakeFirst()
  return user?.role === 'organiser' && user.session_version === (session as { version?: number }).version
}

export default defineEventHandler(async (event) => {
  if (!['POST', 'PUT', 'PATCH', 'DELETE'].includes(event.method)) return
  const path = event.path.split('?')[0]!
  if (!path.startsWith('/api/')) return
  let limit = path === '/api/stripe/webhook' ? 1 * MB : JSON_LIMIT
  if (UPLOAD_ROUTE.test(path) && await organiserSignedIn(event)) {
    if (uploading >= UPLOADS_AT_ONCE) {
      setResponseHeaders(event, { 'Retry-After': 10, 'Connection': 'close' })
      throw createError({ statusCode: 503, statusMessage: 'Busy', message: 'Other uploads are being read: try again in a few seconds' })
    }
    uploading++
    let released = false
    const release = () => { if (!released) { released = true; uploading-- } }
    // 'close' follows every response, sent or cut off, so a slot is never lost.
    event.node.res.once('close', release)
    limit = UPLOAD_LIMIT
  }
  const tooLarge = () => createError({ statusCode: 413, statusMessage: 'Request too large', message: `The request body is larger than ${limit >= MB ? `${limit / MB} MB` : `${limit / KB} KB`}` })
  const declared = Number(getRequestHeader(event, 'content-length') ?? NaN)
  if (declared > limit) {
    // Refused before reading: the connection is closed behind the answer rather than drained.
    setResponseHeader(event, 'Connection', 'close')
    throw tooLarge()
  }
  const req = event.node.req
  const body = await new Promise<Buffer>((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    req.on('data', (c: Buffer) => {
      size += c.length
      if (size > limit) {
        // Stop reading at once; the 413 goes out and the connection is closed behind it.
        req.removeAllListeners('data')
        req.pause()
        reject(tooLarge())
        return
      }
      chunks.push(c)
    })
    req.on('end', () => resolve(Buffer.concat(chunks)))
    req.on('error', reject)
  }).catch((e) => {
    setResponseHeader(event, 'Connection', 'close')
    throw e
  })
  ;(event as unknown as { _requestBody: Buffer })._requestBody = body
})
