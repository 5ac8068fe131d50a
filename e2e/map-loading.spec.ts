import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { expect, gotoHydrated, signInAs, test } from './fixtures'

// The map library (about 1 MB of script, and its worker) is loaded only by the pages that draw a map.
const nuxtDir = join(process.cwd(), '.output/public/_nuxt')
const files = readdirSync(nuxtDir).filter((f) => /\.(m?js)$/.test(f))
// The library's own chunk: the large script that carries MapLibre's code; and its worker.
const mapChunks = files.filter((f) => f.startsWith('maplibre-gl-worker')
  || (statSync(join(nuxtDir, f)).size > 400_000 && readFileSync(join(nuxtDir, f), 'utf8').includes('maplibre')))

test.describe('map code only where a map is drawn', () => {
  test('the build has a separate map chunk and worker', () => {
    expect(mapChunks.some((f) => f.startsWith('maplibre-gl-worker'))).toBe(true)
    expect(mapChunks.filter((f) => !f.startsWith('maplibre-gl-worker')).length).toBe(1)
  })

  test('the home page and the sign-in page never ask for the map code; the planning page does', async ({ page }) => {
    const asked: string[] = []
    page.on('request', (r) => { const name = new URL(r.url()).pathname.split('/').pop() ?? ''; if (mapChunks.includes(name)) asked.push(name) })
    await gotoHydrated(page, '/')
    await page.waitForLoadState('networkidle')
    expect(asked, 'map code asked for by the home page').toEqual([])
    await signInAs(page, 'organiser@umbrafield.test')
    await page.waitForLoadState('networkidle')
    expect(asked, 'map code asked for by the sign-in and landing pages').toEqual([])
    await gotoHydrated(page, '/plan/1')
    await expect(page.locator('.maplibregl-canvas')).toBeVisible({ timeout: 30_000 })
    expect(asked.length).toBeGreaterThan(0)
  })
})
