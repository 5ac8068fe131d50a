// A local stand-in for the part of Stripe's API that Umbrafield uses: customers, Checkout Sessions,
// PaymentIntents, refunds and events, with a hosted payment page of its own and signed webhooks.
// The official `stripe` SDK talks to it unchanged through its host/port/protocol options.
//
// Env: STRIPE_FAKE_PORT (12111), STRIPE_WEBHOOK_SECRET, STRIPE_FAKE_WEBHOOK_URL (where events go).
// Test cards on the payment page: 4242 4242 4242 4242 succeeds, 4000 0000 0000 0002 is declined,
// 4000 0025 0000 3155 needs an extra confirmation step.
// Control (for scripts and tests): POST /_fake/checkout/sessions/{id}/complete {outcome}, POST /_fake/webhooks/{pause|resume},
// POST /_fake/refunds/fail {count} (the next count refunds fail) or {on: true|false} (all fail while on),
// POST /_fake/refunds/drop-reply {count}, GET /_fake/holdings?sessions=…, GET /_fake/state.
import { createHmac, randomBytes } from 'node:crypto'
import { createServer } from 'node:http'

const PORT = Number(process.env.STRIPE_FAKE_PORT || 12111)
const SECRET = process.env.STRIPE_WEBHOOK_SECRET || 'whsec_umbrafield_local_fake'
const WEBHOOK_URL = process.env.STRIPE_FAKE_WEBHOOK_URL || 'http://127.0.0.1:3000/api/stripe/webhook'

const db = { customers: new Map(), sessions: new Map(), intents: new Map(), refunds: new Map(), events: [], idem: new Map() }
let paused = false
/** Refund creations still to fail on purpose (set through /_fake/refunds/fail). */
let failRefunds = 0
/**
 * New refunds whose reply is to be lost (set through /_fake/refunds/drop-reply): the refund is made
 * and its idempotent reply kept, as at Stripe, but the connection is cut before the caller hears it,
 * and so is every repeat under the same idempotency key. A caller learns of it only by asking.
 */
let dropRefundReplies = 0
const lostReplyKeys = new Set()
/** How many replies were cut so far (GET /_fake/state), so a test can tell when the caller stopped trying. */
let lostReplies = 0
/** While on (POST /_fake/refunds/fail {on: true}), every refund creation fails, until {on: false}. */
let failRefundsOn = false
/** Refund creations failed on purpose so far. */
let refundsFailed = 0
const pending = [] // events waiting for delivery while paused or failing

const id = (prefix) => `${prefix}_${randomBytes(12).toString('hex')}`
const now = () => Math.floor(Date.now() / 1000)

/** Parses Stripe's form encoding with bracket keys: a[b][0][c]=v. */
function parseForm(text) {
  const out = {}
  for (const [key, value] of new URLSearchParams(text)) {
    const path = key.replace(/\]/g, '').split('[')
    let node = out
    path.forEach((p, i) => {
      if (i === path.length - 1) node[p] = value
      else node = node[p] ??= /^\d+$/.test(path[i + 1]) ? [] : {}
    })
  }
  return out
}

function send(res, status, body, headers = {}) {
  res.writeHead(status, { 'content-type': 'application/json', ...headers })
  res.end(JSON.stringify(body))
}
const error = (res, status, message, code = 'resource_missing', type = 'invalid_request_error') => send(res, status, { error: { type, code, message } })

function sign(payload) {
  const t = now()
  return `t=${t},v1=${createHmac('sha256', SECRET).update(`${t}.${payload}`).digest('hex')}`
}

async function deliver(event, attempt = 0) {
  if (paused) { pending.push(event); return }
  const payload = JSON.stringify(event)
  try {
    const r = await fetch(WEBHOOK_URL, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': sign(payload) }, body: payload })
    if (r.status >= 300) throw new Error(`status ${r.status}`)
    event.delivered = true
  } catch {
    // Like Stripe, retry with backoff (compressed: 0.5 s, 1 s, 2 s, … up to 8 tries).
    if (attempt < 8) setTimeout(() => deliver(event, attempt + 1), 500 * 2 ** attempt)
    else pending.push(event)
  }
}

function emit(type, object) {
  const event = { id: id('evt'), object: 'event', api_version: '2025-01-01', created: now(), type, livemode: false, pending_webhooks: 1, data: { object }, request: { id: null } }
  db.events.push(event)
  void deliver(event)
  return event
}

function list(res, items, query) {
  const limit = Math.min(Number(query.get('limit') || 10), 100)
  const created = Number(query.get('created[gte]') || 0)
  const data = items.filter((x) => x.created >= created).sort((a, b) => b.created - a.created)
  send(res, 200, { object: 'list', data: data.slice(0, limit), has_more: data.length > limit, url: '' })
}

/**
 * Pays (or declines) a session. Like Stripe, an expired or completed session cannot be paid; the
 * control endpoint's `force` simulates a payment already in flight when the session was expired.
 */
function completeSession(session, outcome, force = false) {
  if (session.status !== 'open' && !(force && session.status === 'expired')) return { ok: session.payment_status === 'paid', session }
  if (outcome === 'declined') {
    session.last_error = 'Your card was declined.'
    emit('checkout.session.async_payment_failed', session)
    return { ok: false, session }
  }
  const intent = {
    id: id('pi'), object: 'payment_intent', amount: session.amount_total, amount_received: session.amount_total, currency: session.currency,
    status: 'succeeded', created: now(), customer: session.customer, metadata: session.metadata, latest_charge: id('ch'), amount_refunded: 0,
  }
  db.intents.set(intent.id, intent)
  Object.assign(session, { status: 'complete', payment_status: 'paid', payment_intent: intent.id })
  emit('checkout.session.completed', session)
  emit('payment_intent.succeeded', intent)
  return { ok: true, session }
}

function page(title, body) {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${title}</title>
<style>body{font-family:system-ui,sans-serif;background:#eef0f5;color:#1d2333;margin:0}main{max-width:26rem;margin:3rem auto;background:#fff;border-radius:10px;padding:1.5rem 1.75rem;box-shadow:0 4px 20px #0001}
h1{font-size:1.2rem;margin:0 0 .25rem}p.small{color:#5a6275;font-size:.85rem}label{display:block;font-size:.8rem;font-weight:600;margin:.9rem 0 .3rem}
input{width:100%;box-sizing:border-box;padding:.6rem;border:1px solid #c5cad6;border-radius:6px;font-size:1rem}button{margin-top:1.1rem;width:100%;padding:.7rem;border:0;border-radius:6px;background:#2b5bd7;color:#fff;font-size:1rem;font-weight:600;cursor:pointer}
.amount{font-size:1.6rem;font-weight:700;margin:.5rem 0}.err{background:#fde8e8;color:#9b1c1c;padding:.6rem;border-radius:6px}.tag{display:inline-block;background:#ffe9a8;color:#6b4b00;font-size:.7rem;font-weight:700;padding:.15rem .4rem;border-radius:4px}</style></head>
<body><main><span class="tag">TEST PAYMENT — local fake, no money moves</span>${body}</main></body></html>`
}

const money = (minor, cur) => new Intl.NumberFormat('en-GB', { style: 'currency', currency: cur.toUpperCase() }).format(minor / 100)

function payPage(s, err = '') {
  const name = s.line_items?.[0]?.price_data?.product_data?.name ?? 'Payment'
  return page('Pay', `<h1>${name.replace(/</g, '&lt;')}</h1><div class="amount">${money(s.amount_total, s.currency)}</div>
${err ? `<p class="err" role="alert">${err}</p>` : ''}
<form method="post" action="/pay/${s.id}"><label for="card">Card number</label><input id="card" name="card" inputmode="numeric" autocomplete="off" value="4242 4242 4242 4242">
<label for="exp">Expiry</label><input id="exp" name="exp" value="12 / 30"><label for="cvc">CVC</label><input id="cvc" name="cvc" value="123">
<button type="submit">Pay ${money(s.amount_total, s.currency)}</button></form>
<p class="small">4242 4242 4242 4242 succeeds · 4000 0000 0000 0002 is declined · 4000 0025 0000 3155 asks for an extra step.</p>
<p class="small"><a href="${s.cancel_url}">Cancel and go back</a></p>`)
}

function redirect(res, to) { res.writeHead(303, { location: to }); res.end() }

const server = createServer(async (req, res) => {
  const url = new URL(req.url, `http://${req.headers.host}`)
  const chunks = []
  for await (const c of req) chunks.push(c)
  const raw = Buffer.concat(chunks).toString('utf8')
  const form = req.headers['content-type']?.includes('json') ? JSON.parse(raw || '{}') : parseForm(raw)
  const seg = url.pathname.split('/').filter(Boolean)

  // Idempotency: the same key on a POST replays the first response.
  const idemKey = req.method === 'POST' && seg[0] === 'v1' ? req.headers['idempotency-key'] : undefined
  const refundCreate = req.method === 'POST' && seg[0] === 'v1' && seg[1] === 'refunds' && !seg[2]
  if (refundCreate && idemKey && lostReplyKeys.has(idemKey)) { lostReplies++; return void res.destroy() }
  if (idemKey && db.idem.has(idemKey)) { const [st, body] = db.idem.get(idemKey); return send(res, st, body, { 'idempotent-replayed': 'true' }) }
  const reply = (status, body) => { if (idemKey) db.idem.set(idemKey, [status, body]); send(res, status, body) }

  try {
    if (seg[0] === 'v1') {
      if (!req.headers.authorization?.startsWith('Bearer sk_')) return error(res, 401, 'Invalid API key provided', 'api_key_invalid', 'authentication_error')
      const [, resource, rid, action] = seg
      if (resource === 'customers' && req.method === 'POST' && !rid) {
        const c = { id: id('cus'), object: 'customer', created: now(), email: form.email ?? null, name: form.name ?? null, metadata: form.metadata ?? {} }
        db.customers.set(c.id, c)
        return reply(200, c)
      }
      if (resource === 'customers' && rid && req.method === 'GET') return db.customers.has(rid) ? send(res, 200, db.customers.get(rid)) : error(res, 404, `No such customer: '${rid}'`)
      if (resource === 'checkout' && rid === 'sessions') {
        const sid = action
        if (req.method === 'POST' && !sid) {
          const items = form.line_items ?? []
          const amount = items.reduce((sum, li) => sum + Number(li.price_data?.unit_amount ?? 0) * Number(li.quantity ?? 1), 0)
          if (!amount || !form.success_url) return error(res, 400, 'line_items with price_data and success_url are required', 'parameter_missing')
          const s = {
            id: id('cs_test'), object: 'checkout.session', created: now(), mode: form.mode ?? 'payment', status: 'open', payment_status: 'unpaid',
            amount_total: amount, currency: (items[0]?.price_data?.currency ?? 'eur').toLowerCase(), customer: form.customer ?? null,
            customer_email: form.customer_email ?? null, client_reference_id: form.client_reference_id ?? null, metadata: form.metadata ?? {},
            success_url: form.success_url, cancel_url: form.cancel_url ?? form.success_url, payment_intent: null,
            expires_at: Number(form.expires_at ?? now() + 3600), line_items: items, url: '',
          }
          s.url = `http://${req.headers.host?.startsWith('localhost') ? req.headers.host : `127.0.0.1:${PORT}`}/pay/${s.id}`
          db.sessions.set(s.id, s)
          return reply(200, s)
        }
        if (req.method === 'GET' && sid) return db.sessions.has(sid) ? send(res, 200, db.sessions.get(sid)) : error(res, 404, `No such checkout.session: '${sid}'`)
        if (req.method === 'GET') return list(res, [...db.sessions.values()], url.searchParams)
        if (req.method === 'POST' && seg[4] === 'expire') {
          const s = db.sessions.get(sid)
          if (!s) return error(res, 404, `No such checkout.session: '${sid}'`)
          if (s.status === 'open') { s.status = 'expired'; emit('checkout.session.expired', s) }
          return reply(200, s)
        }
      }
      if (resource === 'payment_intents') {
        if (req.method === 'GET' && rid) return db.intents.has(rid) ? send(res, 200, db.intents.get(rid)) : error(res, 404, `No such payment_intent: '${rid}'`)
        if (req.method === 'GET') return list(res, [...db.intents.values()], url.searchParams)
      }
      if (resource === 'refunds' && req.method === 'POST' && !rid) {
        // Failures injected through /_fake/refunds/fail, so tests can watch a refund fail, then succeed on retry.
        if (failRefundsOn || failRefunds > 0) { if (!failRefundsOn) failRefunds--; refundsFailed++; return reply(400, { error: { type: 'invalid_request_error', code: 'refund_failed', message: 'The refund failed (injected by the local fake)' } }) }
        const pi = db.intents.get(form.payment_intent)
        if (!pi) return error(res, 400, `No such payment_intent: '${form.payment_intent}'`)
        const amount = form.amount ? Number(form.amount) : pi.amount_received - pi.amount_refunded
        if (!(amount > 0) || amount > pi.amount_received - pi.amount_refunded) return error(res, 400, 'Refund amount is greater than the unrefunded amount', 'amount_too_large')
        pi.amount_refunded += amount
        const r = { id: id('re'), object: 'refund', created: now(), amount, currency: pi.currency, payment_intent: pi.id, status: 'succeeded', reason: form.reason ?? null, metadata: form.metadata ?? {} }
        db.refunds.set(r.id, r)
        emit('charge.refunded', { id: pi.latest_charge, object: 'charge', payment_intent: pi.id, amount_refunded: pi.amount_refunded })
        if (dropRefundReplies > 0) {
          dropRefundReplies--
          if (idemKey) { db.idem.set(idemKey, [200, r]); lostReplyKeys.add(idemKey) }
          lostReplies++
          return void res.destroy()
        }
        return reply(200, r)
      }
      if (resource === 'refunds' && req.method === 'GET' && rid) return db.refunds.has(rid) ? send(res, 200, db.refunds.get(rid)) : error(res, 404, `No such refund: '${rid}'`)
      if (resource === 'refunds' && req.method === 'GET') {
        const pi = url.searchParams.get('payment_intent')
        return list(res, [...db.refunds.values()].filter((r) => !pi || r.payment_intent === pi), url.searchParams)
      }
      if (resource === 'events') {
        if (rid) { const e = db.events.find((x) => x.id === rid); return e ? send(res, 200, e) : error(res, 404, `No such event: '${rid}'`) }
        return list(res, db.events, url.searchParams)
      }
      return error(res, 404, `Unrecognized request URL (${req.method}: ${url.pathname}). This local fake covers only what Umbrafield uses.`, 'unknown_route')
    }

    // Hosted payment page.
    if (seg[0] === 'pay' && seg[1]) {
      const s = db.sessions.get(seg[1])
      if (!s) { res.writeHead(404, { 'content-type': 'text/html' }); return res.end(page('Not found', '<h1>No such payment</h1>')) }
      if (s.status !== 'open') return redirect(res, s.status === 'complete' ? s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id) : s.cancel_url)
      res.setHeader('content-type', 'text/html; charset=utf-8')
      if (req.method === 'GET') return res.end(payPage(s))
      const card = String(form.card ?? '').replace(/\s+/g, '')
      if (seg[2] === 'confirm') {
        if (form.decision !== 'approve') { res.end(payPage(s, 'The extra step was not completed. Try again.')); return }
        completeSession(s, 'succeeded')
        return redirect(res, s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id))
      }
      if (card === '4000002500003155') {
        return res.end(page('Confirm payment', `<h1>Confirm this payment</h1><p>Your bank asks you to confirm ${money(s.amount_total, s.currency)}.</p>
<form method="post" action="/pay/${s.id}/confirm"><button name="decision" value="approve">Approve</button><button name="decision" value="reject" style="background:#6b7280">Reject</button></form>`))
      }
      if (card === '4000000000000002' || !/^\d{16}$/.test(card)) {
        completeSession(s, 'declined')
        return res.end(payPage(s, 'Your card was declined.'))
      }
      completeSession(s, 'succeeded')
      return redirect(res, s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id))
    }

    // Control endpoints.
    if (seg[0] === '_fake') {
      if (seg[1] === 'checkout' && seg[2] === 'sessions' && seg[4] === 'complete' && req.method === 'POST') {
        const s = db.sessions.get(seg[3])
        if (!s) return error(res, 404, 'No such session')
        const r = completeSession(s, form.outcome === 'declined' ? 'declined' : 'succeeded', form.force === true)
        return send(res, 200, { ok: r.ok, session: r.session })
      }
      if (seg[1] === 'webhooks' && seg[2] === 'pause') { paused = true; return send(res, 200, { paused }) }
      if (seg[1] === 'webhooks' && seg[2] === 'resume') {
        paused = false
        const queue = pending.splice(0)
        for (const e of queue) void deliver(e)
        return send(res, 200, { paused, redelivering: queue.length })
      }
      if (seg[1] === 'events' && seg[3] === 'redeliver') {
        const e = db.events.find((x) => x.id === seg[2])
        if (!e) return error(res, 404, 'No such event')
        await deliver(e)
        return send(res, 200, { ok: true })
      }
      if (seg[1] === 'refunds' && seg[2] === 'drop-reply' && req.method === 'POST') { dropRefundReplies = Number(form.count ?? 1); return send(res, 200, { dropRefundReplies }) }
      if (seg[1] === 'refunds' && seg[2] === 'fail' && req.method === 'POST') {
        if (typeof form.on === 'boolean') failRefundsOn = form.on
        else failRefunds = Number(form.count ?? 1)
        return send(res, 200, { failRefunds, on: failRefundsOn })
      }
      // What the fake holds for the given checkout sessions: received − refunded over their payment
      // intents. By session, not by booking id: several test databases share one fake.
      if (seg[1] === 'holdings') {
        const sessions = (url.searchParams.get('sessions') ?? '').split(',').filter(Boolean)
        const mine = sessions.map((s) => db.sessions.get(s)?.payment_intent).filter(Boolean).map((p) => db.intents.get(p))
        return send(res, 200, { sessions: sessions.length, intents: mine.length, netMinor: mine.reduce((s, pi) => s + pi.amount_received - pi.amount_refunded, 0) })
      }
      if (seg[1] === 'state') return send(res, 200, { sessions: db.sessions.size, intents: db.intents.size, refunds: [...db.refunds.values()], refundsFailed, events: db.events.map((e) => ({ id: e.id, type: e.type, delivered: !!e.delivered })), paused, lostReplies })
      if (seg[1] === 'health') return send(res, 200, { ok: true })
    }
    error(res, 404, 'Not found', 'unknown_route')
  } catch (e) {
    error(res, 500, `fake error: ${e.message}`, 'api_error', 'api_error')
  }
})

server.listen(PORT, '127.0.0.1', () => console.log(`stripe fake on http://127.0.0.1:${PORT} → webhooks to ${WEBHOOK_URL}`))
process.on('SIGTERM', () => server.close(() => process.exit(0)))
process.on('SIGINT', () => server.close(() => process.exit(0)))
