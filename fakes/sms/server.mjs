// A local stand-in for the one SMS call Umbrafield makes — Messages.create — answering the Twilio
// SDK as the real API does (POST /2010-04-01/Accounts/{AccountSid}/Messages.json, form-encoded,
// HTTP basic auth with the account sid), plus a small Web Push receiver for tests and the demo.
//
// Env: SMS_FAKE_PORT (12131), SMS_FAKE_ACCOUNT_SID, SMS_FAKE_AUTH_TOKEN (what the app must send).
// Control: GET /_fake/messages → [{to, from, body, at, sid}]; POST /_fake/fail {count} (the next
// count sends fail with a 503 and the API's error body); POST /_fake/reset; GET /_fake/health.
// Push: POST /_fake/push/{name} records a push as a push service would (201), GET /_fake/pushes lists
// [{name, at, encoding, ttl, urgency, vapid, bytes}]; POST /_fake/push-gone/{name} makes that endpoint answer 410.
import { randomBytes } from 'node:crypto'
import { createServer } from 'node:http'

const PORT = Number(process.env.SMS_FAKE_PORT || 12131)
const SID = process.env.SMS_FAKE_ACCOUNT_SID || 'AC00000000000000000000000000000000'
const TOKEN = process.env.SMS_FAKE_AUTH_TOKEN || 'umbrafield_local_fake_token'

let messages = []
let pushes = []
const gone = new Set()
let failNext = 0

function send(res, status, body) {
  res.writeHead(status, { 'content-type': 'application/json' })
  res.end(JSON.stringify(body))
}
/** Twilio's error body (https://www.twilio.com/docs/usage/twilios-response#response-formats-exceptions). */
const apiError = (res, status, code, message) => send(res, status, { code, message, more_info: `https://www.twilio.com/docs/errors/${code}`, status })

function readBody(req) {
  return new Promise((resolve) => {
    const chunks = []
    req.on('data', (c) => chunks.push(c))
    req.on('end', () => resolve(Buffer.concat(chunks)))
  })
}

createServer(async (req, res) => {
  const url = new URL(req.url, `http://127.0.0.1:${PORT}`)
  const body = await readBody(req)
  if (req.method === 'GET' && url.pathname === '/_fake/health') return send(res, 200, { ok: true })
  if (req.method === 'GET' && url.pathname === '/_fake/messages') return send(res, 200, messages)
  if (req.method === 'GET' && url.pathname === '/_fake/pushes') return send(res, 200, pushes)
  if (req.method === 'POST' && url.pathname === '/_fake/reset') { messages = []; pushes = []; gone.clear(); failNext = 0; return send(res, 200, { ok: true }) }
  if (req.method === 'POST' && url.pathname === '/_fake/fail') {
    failNext = Number(JSON.parse(body.toString() || '{}').count ?? 1)
    return send(res, 200, { failNext })
  }
  const gonePath = /^\/_fake\/push-gone\/([\w-]+)$/.exec(url.pathname)
  if (req.method === 'POST' && gonePath) { gone.add(gonePath[1]); return send(res, 200, { ok: true }) }
  const pushPath = /^\/_fake\/push\/([\w-]+)$/.exec(url.pathname)
  if (req.method === 'POST' && pushPath) {
    if (gone.has(pushPath[1])) return send(res, 410, { error: 'subscription gone' })
    // RFC 8292: "vapid t=<JWT>, k=<public key>"; RFC 8188 aes128gcm body.
    const auth = req.headers.authorization ?? ''
    pushes.push({
      name: pushPath[1], at: new Date().toISOString(), encoding: req.headers['content-encoding'] ?? null, ttl: req.headers.ttl ?? null,
      urgency: req.headers.urgency ?? null, vapid: /^vapid t=[\w-]+\.[\w-]+\.[\w-]+, k=[\w-]+$/.test(auth) ? auth : null, bytes: body.length,
    })
    res.writeHead(201, { location: `/_fake/push/${pushPath[1]}/${pushes.length}` })
    return res.end()
  }
  const create = /^\/2010-04-01\/Accounts\/(\w+)\/Messages\.json$/.exec(url.pathname)
  if (req.method === 'POST' && create) {
    const [user, pass] = Buffer.from((req.headers.authorization ?? '').replace(/^Basic /, ''), 'base64').toString().split(':')
    if (user !== SID || pass !== TOKEN || create[1] !== SID) return apiError(res, 401, 20003, 'Authenticate')
    const form = new URLSearchParams(body.toString())
    const to = form.get('To'), from = form.get('From'), text = form.get('Body')
    if (!to || !/^\+[1-9]\d{6,14}$/.test(to)) return apiError(res, 400, 21211, `The 'To' number ${to} is not a valid phone number.`)
    if (!from) return apiError(res, 400, 21603, "The 'From' phone number is required.")
    if (!text) return apiError(res, 400, 21602, 'Message body is required.')
    if (failNext > 0) { failNext--; return apiError(res, 503, 20500, 'Service unavailable (the fake was told to fail)') }
    const sid = `SM${randomBytes(16).toString('hex')}`
    const at = new Date()
    messages.push({ to, from, body: text, at: at.toISOString(), sid })
    return send(res, 201, {
      account_sid: SID, api_version: '2010-04-01', body: text, date_created: at.toUTCString(), date_sent: null, date_updated: at.toUTCString(),
      direction: 'outbound-api', error_code: null, error_message: null, from, messaging_service_sid: null, num_media: '0', num_segments: String(Math.ceil(text.length / 153) || 1),
      price: null, price_unit: 'USD', sid, status: 'queued', subresource_uris: { media: `/2010-04-01/Accounts/${SID}/Messages/${sid}/Media.json` }, to,
      uri: `/2010-04-01/Accounts/${SID}/Messages/${sid}.json`,
    })
  }
  send(res, 404, { code: 20404, message: 'The requested resource was not found', status: 404 })
}).listen(PORT, '127.0.0.1', () => console.log(`SMS fake on http://127.0.0.1:${PORT}`))
