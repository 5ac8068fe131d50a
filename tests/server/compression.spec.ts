import { readdirSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { useApp } from './app'

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
