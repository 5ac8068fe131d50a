import { request } from 'node:http'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { api, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, TRAVELLER2, useApp } from './app'

// This suite's app trusts 127.0.0.1 as its proxy, so X-Forwarded-Proto can be tried; the public
// path route allows 3 requests a minute per address here.
await useApp({ NUXT_TRUSTED_PROXIES: '127.0.0.1', UMBRAFIELD_PATH_LIMIT: '3' })

/** A raw request, so that a chunked body of any size (no Content-Length) can be sent. */
function raw(path: string, opts: { method: string; headers: Record<string, string>; chunks: Buffer[] }): Promise<{ status: number; body: string }> {
  const u = new URL(url(path))
  return new Promise((resolve, reject) => {
    const req = request({ host: u.hostname, port: u.port, path: u.pathname, method: opts.method, headers: opts.headers }, (res) => {
      const parts: Buffer[] = []
      res.on('data', (c) => parts.push(c)).on('end', () => resolve({ status: res.statusCode ?? 0, body: Buffer.concat(parts).toString('utf8') }))
    })
    req.on('error', (e) => (e.message.includes('EPIPE') || e.message.includes('ECONNRESET') ? resolve({ status: -1, body: e.message }) : reject(e)))
    let i = 0
    const next = () => { if (i < opts.chunks.length) { if (req.write(opts.chunks[i++])) setImmediate(next); else req.once('drain', next) } else req.end() }
    next()
  })
}

describe('request limits', () => {
  it('a chunked body over the JSON limit gets 413 while it is read, and the app still answers', async () => {
    const chunk = Buffer.alloc(16 * 1024, 'a')
    const r = await raw('/api/auth/login', { method: 'POST', headers: { 'content-type': 'application/json', 'transfer-encoding': 'chunked' }, chunks: Array.from({ length: 64 }, () => chunk) })
    expect([413, -1]).toContain(r.status)
    expect((await fetch(url('/api/health'))).status).toBe(200)
    // A declared length over the limit is refused before reading.
    const big = await fetch(url('/api/auth/register'), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'x'.repeat(100_000) }) })
    expect(big.status).toBe(413)
  })
})

describe('cross-origin writes', () => {
  it('a POST from another origin, or marked cross-site, is refused; JSON routes refuse form bodies', async () => {
    const login = JSON.stringify({ email: ORGANISER, password: 'eclipse-demo' })
    expect((await fetch(url('/api/auth/login'), { method: 'POST', headers: { 'content-type': 'application/json', origin: 'http://evil.example' }, body: login })).status).toBe(403)
    expect((await fetch(url('/api/auth/login'), { method: 'POST', headers: { 'content-type': 'application/json', 'sec-fetch-site': 'cross-site' }, body: login })).status).toBe(403)
    const own = new URL(url('/')).origin
    expect((await fetch(url('/api/auth/login'), { method: 'POST', headers: { 'content-type': 'application/json', origin: own }, body: login })).status).toBe(200)
    const form = await fetch(url('/api/auth/login'), { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: `email=${ORGANISER}&password=eclipse-demo` })
    expect(form.status).toBe(415)
    // A body-less POST (sign-out) from another origin is refused too.
    const cookie = await signIn(TRAVELLER)
    expect((await fetch(url('/api/auth/logout'), { method: 'POST', headers: { cookie, origin: 'http://evil.example' } })).status).toBe(403)
    expect((await api('/api/me', { cookie })).status).toBe(200)
  })
})

describe('security headers', () => {
  it('pages and the API carry CSP with frame-ancestors none, nosniff and a referrer policy; HSTS only over HTTPS', async () => {
    for (const path of ['/', '/api/eclipses?from=2027&to=2027']) {
      const r = await fetch(url(path))
      expect(r.headers.get('content-security-policy')).toMatch(/frame-ancestors 'none'/)
      expect(r.headers.get('content-security-policy')).toMatch(/worker-src 'self' blob:/)
      expect(r.headers.get('x-content-type-options')).toBe('nosniff')
      expect(r.headers.get('referrer-policy')).toBe('same-origin')
      expect(r.headers.get('strict-transport-security')).toBeNull()
    }
    const behindTls = await fetch(url('/'), { headers: { 'x-forwarded-proto': 'https' } })
    expect(behindTls.headers.get('strict-transport-security')).toMatch(/max-age=\d+/)
  })
})

describe('sessions that end', () => {
  it('after sign-out the old cookie gets 401', async () => {
    const cookie = await signIn(TRAVELLER2)
    expect((await api('/api/me', { cookie })).status).toBe(200)
    await api('/api/auth/logout', { method: 'POST', cookie })
    expect((await api('/api/me', { cookie })).status).toBe(401)
  })

  it('a password change ends the other sessions; "sign out everywhere" ends them all', async () => {
    const org = await signIn(ORGANISER)
    await inviteAndChoosePassword(org, { name: 'Two Devices', email: 'two-devices@umbrafield.test', role: 'guide' }, 'two-devices-first')
    const phone = await signIn('two-devices@umbrafield.test', 'two-devices-first')
    const laptop = await signIn('two-devices@umbrafield.test', 'two-devices-first')
    const changed = await api('/api/me', { method: 'PATCH', body: { currentPassword: 'two-devices-first', newPassword: 'a-new-long-password' }, cookie: laptop })
    expect(changed.status).toBe(200)
    const renewed = changed.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
    expect((await api('/api/me', { cookie: phone })).status).toBe(401)
    expect((await api('/api/me', { cookie: renewed })).status).toBe(200)
    const tablet = await signIn('two-devices@umbrafield.test', 'a-new-long-password')
    await api('/api/auth/sign-out-everywhere', { method: 'POST', cookie: renewed })
    expect((await api('/api/me', { cookie: tablet })).status).toBe(401)
    expect((await api('/api/me', { cookie: renewed })).status).toBe(401)
  })

  it('a role change ends the sessions of the person changed', async () => {
    const org = await signIn(ORGANISER)
    const inv = await inviteAndChoosePassword(org, { name: 'Soon Organiser', email: 'soon-organiser@umbrafield.test', role: 'guide' }, 'soon-organiser-pw')
    const their = await signIn('soon-organiser@umbrafield.test', 'soon-organiser-pw')
    expect((await api(`/api/users/${inv.body.user.id}`, { method: 'PATCH', body: { role: 'organiser' }, cookie: org })).status).toBe(200)
    expect((await api('/api/me', { cookie: their })).status).toBe(401)
    expect((await api('/api/me', { cookie: org })).status).toBe(200)
  })
})

describe('safe exports', () => {
  it('a spreadsheet formula in a traveller\'s name is escaped in the bookings CSV', async () => {
    const org = await signIn(ORGANISER)
    await inviteAndChoosePassword(org, { name: '=HYPERLINK("http://evil.example","x")', email: 'formula@umbrafield.test', role: 'guide' }, 'formula-pw-123')
    const cookie = await signIn('formula@umbrafield.test', 'formula-pw-123')
    const trips = await api('/api/trips')
    const luxor = trips.body.data.find((t: { title: string }) => t.title.startsWith('Luxor'))
    expect((await api(`/api/trips/${luxor.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie })).status).toBe(201)
    const csv = await api(`/api/trips/${luxor.id}/bookings.csv`, { cookie: org })
    const line = csv.body.split(/\r?\n/).find((l: string) => l.includes('HYPERLINK'))
    expect(line).toContain(`"'=HYPERLINK(""http://evil.example"",""x"")"`)
  })
})

describe('throttles on costly and sensitive routes', () => {
  it('the public path route is rate-limited per address (X-Forwarded-For believed from the trusted proxy)', async () => {
    const from = (ip: string) => ({ headers: { 'x-forwarded-for': ip } })
    for (let i = 0; i < 3; i++) expect((await api('/api/eclipses/2027-08-02/path?step=900', from('203.0.113.7'))).status).toBe(200)
    const limited = await api('/api/eclipses/2027-08-02/path?step=900', from('203.0.113.7'))
    expect(limited.status).toBe(429)
    expect(Number(limited.headers.get('retry-after'))).toBeGreaterThan(0)
    // Another client address has its own allowance.
    expect((await api('/api/eclipses/2027-08-02/path?step=900', from('203.0.113.8'))).status).toBe(200)
  })

  it('the current-password check backs off after five wrong guesses', async () => {
    const org = await signIn(ORGANISER)
    await inviteAndChoosePassword(org, { name: 'Guessed', email: 'guessed@umbrafield.test', role: 'guide' }, 'guessed-pw-123')
    const cookie = await signIn('guessed@umbrafield.test', 'guessed-pw-123')
    const statuses: number[] = []
    for (let i = 0; i < 6; i++) statuses.push((await api('/api/me', { method: 'PATCH', body: { currentPassword: `wrong-${i}`, newPassword: 'a-new-long-password' }, cookie })).status)
    expect(statuses).toEqual([400, 400, 400, 400, 400, 429])
  })
})
