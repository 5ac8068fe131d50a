/**
 * Request bodies are limited while they are read, chunked requests included: 64 KB for JSON,
 * 26 MB for the upload routes, 1 MB for Stripe's webhook. The body is read here, once, and handed
 * to h3 (event._requestBody), so no handler can read more than its limit. Over the limit: 413.
 */
const KB = 1024, MB = 1024 * 1024
function limitFor(path: string): number {
  if (path === '/api/stripe/webhook') return 1 * MB
  if (/^\/api\/climatology$/.test(path) || /^\/api\/workspaces\/\d+\/(sites\/import|terrain)$/.test(path)) return 26 * MB
  return 64 * KB
}

export default defineEventHandler(async (event) => {
  if (!['POST', 'PUT', 'PATCH', 'DELETE'].includes(event.method)) return
  const path = event.path.split('?')[0]!
  if (!path.startsWith('/api/')) return
  const limit = limitFor(path)
  const tooLarge = () => createError({ statusCode: 413, statusMessage: 'Request too large', message: `The request body is larger than ${limit >= MB ? `${limit / MB} MB` : `${limit / KB} KB`}` })
  const declared = Number(getRequestHeader(event, 'content-length') ?? NaN)
  if (declared > limit) throw tooLarge()
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
