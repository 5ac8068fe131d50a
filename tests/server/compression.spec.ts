import { readdirSync } from 'node:fs'
import { request } from 'node:http'
import { join, resolve } from 'node:path'
import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { ORGANISER, signIn, TRAVELLER, useApp } from './app'

// The build's scripts are served compressed, brotli or gzip, whichever the browser asks for.
await useApp()
const nuxtDir = resolve(__dirname, '../../.output/public/_nuxt')

describe('compressed static assets', () => {
  it('a JavaScript asset comes back as brotli or gzip when asked for, and plain when not', async () => {
    const js = readdirSync(nuxtDir).filter((f) => f.endsWith('.js'))
    expect(js.length).toBeGreaterThan(0)
    const largest = js.map((f) => ({ f, n: readdirSync(nuxtDir).includes(`${f}.br`) })).find((x) => x.n)?.f ?? js[0]!
    const path = `/_nuxt/${largest}`
    for (const [ask, want] of [['br', 'br'], ['gzip', 'gzip'], ['br, gzip', 'br']] as const) {
      const r = await fetch(url(path), { headers: { 'accept-encoding': ask } })
      expect(r.status).toBe(200)
      expect(r.headers.get('content-encoding')).toBe(want)
    }
    const plain = await fetch(url(path), { headers: { 'accept-encoding': 'identity' } })
    expect(plain.headers.get('content-encoding')).toBeNull()
    expect(join(nuxtDir, largest)).toBeTruthy()
  })
})

/** One raw GET (no client-side decoding): status, headers and the bytes as sent. */
function rawGet(path: string, headers: Record<string, string>): Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: Buffer }> {
  return new Promise((done, fail) => {
    const req = request(url(path), { headers }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => done({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) }))
      res.on('error', fail)
    })
    req.on('error', fail)
    req.end()
  })
}

describe('compressed API answers', () => {
  it('a large JSON answer comes back as brotli or gzip when asked for, the same JSON once decoded, plain when not', async () => {
    const cookie = await signIn(ORGANISER)
    const path = '/api/workspaces/1/sites'
    const plain = await rawGet(path, { cookie, 'accept-encoding': 'identity' })
    expect(plain.status).toBe(200)
    expect(plain.headers['content-encoding']).toBeUndefined()
    expect(plain.headers['content-type']).toMatch(/^application\/json/)
    expect(plain.headers.vary).toMatch(/accept-encoding/i)
    expect(plain.body.length).toBeGreaterThan(1024) // big enough to be compressed
    const json = JSON.parse(plain.body.toString('utf8'))
    for (const [ask, want, decode] of [['br', 'br', brotliDecompressSync], ['gzip', 'gzip', gunzipSync], ['gzip, deflate, br', 'br', brotliDecompressSync], ['br;q=0, gzip', 'gzip', gunzipSync]] as const) {
      const r = await rawGet(path, { cookie, 'accept-encoding': ask })
      expect(r.status).toBe(200)
      expect(r.headers['content-encoding']).toBe(want)
      expect(r.headers.vary).toMatch(/accept-encoding/i)
      expect(r.body.length).toBeLessThan(plain.body.length)
      expect(JSON.parse(decode(r.body).toString('utf8'))).toEqual(json)
    }
  })

  it('a small JSON answer, and an error, go out plain', async () => {
    const cookie = await signIn(TRAVELLER)
    const me = await rawGet('/api/me', { cookie, 'accept-encoding': 'br, gzip' })
    expect(me.status).toBe(200)
    expect(me.body.length).toBeLessThan(1024)
    expect(me.headers['content-encoding']).toBeUndefined()
    expect(JSON.parse(me.body.toString('utf8')).email).toBe(TRAVELLER)
    const denied = await rawGet('/api/workspaces/1/sites', { cookie, 'accept-encoding': 'br, gzip' })
    expect(denied.status).toBe(403)
    expect(JSON.parse(denied.body.toString('utf8')).statusCode).toBe(403)
  })
})
