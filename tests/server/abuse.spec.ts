import { request, type ClientRequest } from 'node:http'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { SEARCH_GRID_MAX_POINTS } from '../../server/services/searchGrid'
import { api, ORGANISER, signIn, TEST_DB, TRAVELLER, useApp } from './app'

// This suite's app trusts 127.0.0.1 as its proxy, so each test can speak for made-up client
// addresses through X-Forwarded-For; the public detail and local routes allow 4 requests a minute per address.
await useApp({ NUXT_TRUSTED_PROXIES: '127.0.0.1', UMBRAFIELD_DETAIL_LIMIT: '4', UMBRAFIELD_LOCAL_LIMIT: '4' })

const from = (xff: string) => ({ headers: { 'x-forwarded-for': xff } })

/**
 * Starts a request that declares `length` bytes but sends only `first` of them, and resolves with the
 * server's answer if one comes before `waitMs` (status -1 when none does: the server is waiting for
 * the body). The request is cut off afterwards.
 */
function partialUpload(path: string, headers: Record<string, string>, length: number, first: Buffer, waitMs = 8000): { req: ClientRequest; answer: Promise<{ status: number; retryAfter: string | null; sentBytes: number }> } {
  const u = new URL(url(path))
  const req = request({ host: u.hostname, port: u.port, path: u.pathname, method: 'POST', headers: { ...headers, 'content-length': String(length) } })
  const answer = new Promise<{ status: number; retryAfter: string | null; sentBytes: number }>((resolve) => {
    const timer = setTimeout(() => resolve({ status: -1, retryAfter: null, sentBytes: first.length }), waitMs)
    req.on('response', (res) => {
      clearTimeout(timer)
      resolve({ status: res.statusCode ?? 0, retryAfter: (res.headers['retry-after'] as string | undefined) ?? null, sentBytes: first.length })
      res.resume()
    })
    req.on('error', () => { /* cut off by the server after its answer, or by us */ })
  })
  req.write(first)
  return { req, answer }
}
const MULTIPART = { 'content-type': 'multipart/form-data; boundary=----umbrafield-test' }
const MB = 1024 * 1024

describe(`eclipses outside the stored catalogue are refused before any computation (${TEST_DB})`, () => {
  it('five such requests at once are all refused, and /api/health answers meanwhile', async () => {
    // 2186-07-16 and 1896-08-09 are real total eclipses outside 1900–2100 (formerly computed on demand, ~0.5 s of CPU each).
    const paths = [
      '/api/eclipses/2186-07-16',
      '/api/eclipses/1896-08-09',
      '/api/eclipses/2300-01-01/local?lat=10&lon=10',
      '/api/eclipses/2186-07-16/path',
      '/api/eclipses/2186-07-16/local?lat=10&lon=10',
    ]
    const started = Date.now()
    const [health, ...answers] = await Promise.all([
      fetch(url('/api/health')).then((r) => r.status),
      ...paths.map((p, i) => api(p, from(`198.51.100.${100 + i}`))),
    ])
    expect(health).toBe(200)
    expect(answers.map((a) => a.status)).toEqual([400, 400, 400, 400, 400])
    expect(answers[0]!.body.data.fields.id).toMatch(/catalogue/)
    // A guard only (the statuses above are the test): refusing needs no computation at all.
    expect(Date.now() - started).toBeLessThan(5000)
  })

  it('nor can an organiser set a ΔT for one (formerly computed, then stored)', async () => {
    const org = await signIn(ORGANISER)
    const r = await api('/api/eclipses/2186-07-16/settings', { method: 'PATCH', body: { deltaTSec: 200 }, cookie: org })
    expect(r.status).toBe(400)
  })
})

describe('the path step is one of a few values', () => {
  it.each(['45', '10', '3600', '1.5', 'abc'])('step=%s is a 400 naming the field', async (step) => {
    const r = await api(`/api/eclipses/2027-08-02/path?step=${step}`, from('198.51.100.60'))
    expect(r.status).toBe(400)
    expect(r.body.data.fields.step).toMatch(/one of 30, 60, 120, 300, 600, 900/)
  })
})

describe('public eclipse routes are rate-limited per client address', () => {
  it('GET /api/eclipses/{id} for an anonymous client: 4 a minute, then 429 with Retry-After', async () => {
    const statuses: number[] = []
    for (let i = 0; i < 5; i++) statuses.push((await api('/api/eclipses/2027-08-02', from('203.0.113.50'))).status)
    expect(statuses).toEqual([200, 200, 200, 200, 429])
    // Another client has its own allowance.
    expect((await api('/api/eclipses/2027-08-02', from('203.0.113.51'))).status).toBe(200)
  })

  it('prepending made-up X-Forwarded-For entries does not escape the limit', async () => {
    const statuses: number[] = []
    for (let i = 0; i < 6; i++) {
      // The client writes a fresh left-most entry each time; the proxy appends the real address.
      statuses.push((await api('/api/eclipses/2027-08-02/local?lat=25.6&lon=32.6', from(`10.66.${i}.1, 192.0.2.${i}, 203.0.113.60`))).status)
    }
    expect(statuses).toEqual([200, 200, 200, 200, 429, 429])
  })

  it('IPv6 clients are counted per /64: new addresses in the same /64 do not escape the limit', async () => {
    const statuses: number[] = []
    for (let i = 1; i <= 5; i++) statuses.push((await api('/api/eclipses/2027-08-02', from(`2001:db8:77:1::${i.toString(16)}`))).status)
    expect(statuses).toEqual([200, 200, 200, 200, 429])
    expect((await api('/api/eclipses/2027-08-02', from('2001:db8:77:2::1'))).status).toBe(200)
  })
})

describe(`sign-in backoff counts IPv6 clients per /64 (${TEST_DB})`, () => {
  it('thirty failed sign-ins from one /64, each from a new address and for a new e-mail, then the next waits', async () => {
    const statuses: number[] = []
    for (let i = 1; i <= 31; i++) {
      const r = await fetch(url('/api/auth/login'), {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-forwarded-for': `2001:db8:99:1:${i.toString(16)}::1` },
        body: JSON.stringify({ email: `nobody-${i}@umbrafield.test`, password: 'not-the-password' }),
      })
      statuses.push(r.status)
    }
    // Thirty free failures per address in 15 minutes (THROTTLE.freeByIp), then a wait.
    expect(statuses.slice(0, 30).every((s) => s === 401)).toBe(true)
    expect(statuses[30]).toBe(429)
  })
})

describe(`large bodies only from a signed-in organiser (${TEST_DB})`, () => {
  it.each(['/api/climatology', '/api/workspaces/1/terrain', '/api/workspaces/1/sites/import'])('an anonymous 1 MB POST to %s gets 413 before its body is read', async (path) => {
    const { req, answer } = partialUpload(path, MULTIPART, 1 * MB, Buffer.alloc(1024, 'a'))
    const r = await answer
    req.destroy()
    // Answered after 1 kB of the declared 1 MB: the rest was never waited for.
    expect(r.status).toBe(413)
  })

  it('a traveller likewise; a chunked body is cut off at 64 KB', async () => {
    const cookie = await signIn(TRAVELLER)
    const { req, answer } = partialUpload('/api/climatology', { ...MULTIPART, cookie }, 1 * MB, Buffer.alloc(1024, 'a'))
    expect((await answer).status).toBe(413)
    req.destroy()
    const chunked = await fetch(url('/api/workspaces/1/terrain'), {
      method: 'POST', headers: { ...MULTIPART, cookie },
      body: new ReadableStream({ start(c) { for (let i = 0; i < 8; i++) c.enqueue(new Uint8Array(16 * 1024)); c.close() } }),
      duplex: 'half',
    } as RequestInit).then((r) => r.status, () => -1)
    expect([413, -1]).toContain(chunked)
  })

  it('an organiser may send more than 64 KB; a third large upload at once gets 503 with Retry-After', async () => {
    const cookie = await signIn(ORGANISER)
    const headers = { ...MULTIPART, cookie }
    // Two uploads in flight (headers and 1 kB of a declared 1 MB): the server waits for their bodies.
    const a = partialUpload('/api/climatology', headers, 1 * MB, Buffer.alloc(1024, 'a'), 1500)
    const b = partialUpload('/api/workspaces/1/terrain', headers, 1 * MB, Buffer.alloc(1024, 'a'), 1500)
    expect((await a.answer).status).toBe(-1)
    expect((await b.answer).status).toBe(-1)
    const c = partialUpload('/api/workspaces/1/sites/import', headers, 1 * MB, Buffer.alloc(1024, 'a'))
    const third = await c.answer
    c.req.destroy()
    expect(third.status).toBe(503)
    expect(Number(third.retryAfter)).toBeGreaterThan(0)
    // Once they end (here: cut off), the slots are free again.
    a.req.destroy()
    b.req.destroy()
    await new Promise((r) => setTimeout(r, 300))
    const d = partialUpload('/api/climatology', headers, 1 * MB, Buffer.alloc(1024, 'a'), 1500)
    expect((await d.answer).status).toBe(-1)
    d.req.destroy()
  })
})

describe('scripts run by nonce, not by unsafe-inline', () => {
  const scriptSrc = (csp: string | null) => /(?:^|;)\s*script-src ([^;]*)/.exec(csp ?? '')?.[1] ?? ''

  it.each(['/', '/eclipses/2027-08-02', '/no-such-page'])('%s: every script carries the response\'s nonce, and the nonce changes per response', async (path) => {
    const asBrowser = { headers: { accept: 'text/html' } }
    const pages = await Promise.all([fetch(url(path), asBrowser), fetch(url(path), asBrowser)])
    const nonces: string[] = []
    for (const page of pages) {
      const src = scriptSrc(page.headers.get('content-security-policy'))
      expect(src).not.toMatch(/unsafe-inline/)
      const nonce = /'nonce-([A-Za-z0-9+/=]+)'/.exec(src)?.[1]
      expect(nonce, 'script-src has a nonce').toBeTruthy()
      nonces.push(nonce!)
      const html = await page.text()
      const scripts = [...html.matchAll(/<script\b[^>]*>/gi)].map((m) => m[0])
      const inline = scripts.filter((s) => !/\ssrc=/.test(s) && !/type="application\/json"/.test(s))
      // Nuxt's config script at least is inline, so the check below is not empty.
      expect(inline.length).toBeGreaterThan(0)
      for (const s of scripts) expect(s).toContain(`nonce="${nonce}"`)
    }
    expect(nonces[0]).not.toBe(nonces[1])
  })
})

describe('the best-ground search near a pole', () => {
  it('at lat 89 evaluates a bounded grid and answers', async () => {
    const cookie = await signIn(ORGANISER)
    const started = Date.now()
    const r = await api('/api/workspaces/1/best-spots?lat=89&lon=0&radiusKm=500&limit=3', { cookie })
    expect(r.status).toBe(200)
    expect(r.body.meta.gridPoints).toBeGreaterThan(0)
    expect(r.body.meta.gridPoints).toBeLessThanOrEqual(SEARCH_GRID_MAX_POINTS)
    // A generous guard only; the bound is the grid size above.
    expect(Date.now() - started).toBeLessThan(30_000)
  })
})
