import { COMPRESS_MIN_BYTES, compressJson, pickEncoding } from '../utils/compressJson'

/**
 * API answers in JSON are sent compressed (brotli or gzip, as the client accepts) when they are at
 * least COMPRESS_MIN_BYTES long, with Vary: Accept-Encoding so a cache keeps the forms apart. The
 * built static assets are compressed in advance (nitro.compressPublicAssets); this covers the bodies
 * made per request: the planning page's layers, lists and surfaces.
 */
const JSON_TYPE = /^application\/([a-z0-9.+-]*\+)?json\b/i

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('beforeResponse', async (event, response) => {
    if (!event.path.startsWith('/api/') || event.method === 'HEAD') return
    const res = event.node.res
    if (res.headersSent || res.getHeader('content-encoding')) return
    const body = response.body
    const declared = String(res.getHeader('content-type') ?? '')
    let text: string
    if (typeof body === 'string' && JSON_TYPE.test(declared)) text = body
    else if (body !== null && typeof body === 'object' && !(body as { buffer?: unknown }).buffer && !(body as { pipe?: unknown }).pipe
      && !(body instanceof Response) && !(body instanceof Error) && !(typeof (body as { arrayBuffer?: unknown }).arrayBuffer === 'function')
      && (!declared || JSON_TYPE.test(declared))) text = JSON.stringify(body)
    else return
    appendResponseHeader(event, 'Vary', 'Accept-Encoding')
    // The text is sent as made here (h3 would otherwise serialise the object again).
    if (!declared) setResponseHeader(event, 'Content-Type', 'application/json')
    const encoding = pickEncoding(getRequestHeader(event, 'accept-encoding'))
    if (!encoding || Buffer.byteLength(text, 'utf8') < COMPRESS_MIN_BYTES) {
      response.body = text
      return
    }
    setResponseHeader(event, 'Content-Encoding', encoding)
    response.body = await compressJson(text, encoding)
  })
})
