import { writeArrayBuffer } from 'geotiff'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { url } from '@nuxt/test-utils/e2e'
import { api, GUIDE, ORGANISER, signIn, TRAVELLER, useApp } from './app'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

async function upload(fields: Record<string, string>, file: { name: string; data: Uint8Array | string }, cookie: string) {
  const form = new FormData()
  for (const [k, v] of Object.entries(fields)) form.append(k, v)
  form.append('file', new Blob([file.data as BlobPart]), file.name)
  const res = await fetch(url('/api/climatology'), { method: 'POST', body: form, headers: { cookie } })
  return { status: res.status, body: await res.json() }
}

async function counts() {
  const n = async (t: 'climatology_datasets' | 'climatology_grids') =>
    Number((await db.selectFrom(t).select((eb) => eb.fn.countAll().as('n')).executeTakeFirstOrThrow()).n)
  return { datasets: await n('climatology_datasets'), grids: await n('climatology_grids') }
}

/** A GeoTIFF covering the demo sites (lat 20–38, lon −8–42) at 2° with one uniform value, percent. */
function uniformTiff(pct: number, opts: Record<string, unknown> = {}) {
  const width = 25, height = 9
  return new Uint8Array(writeArrayBuffer(new Float32Array(width * height).fill(pct), {
    width, height, GeographicTypeGeoKey: 4326, GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1,
    ModelPixelScale: [2, 2, 0], ModelTiepoint: [0, 0, 0, -8, 38, 0], ...opts,
  }) as ArrayBuffer)
}

describe('cloud climatology', () => {
  it('lists the demo dataset, labelled as demo', async () => {
    const r = await api('/api/climatology', { cookie: await signIn(GUIDE) })
    expect(r.status).toBe(200)
    const demo = r.body.data.find((d: { demo: boolean }) => d.demo)
    expect(demo.name).toContain('Demo data — not a real climatology')
    expect(demo.months).toEqual([8])
    expect((await api('/api/climatology', { cookie: await signIn(TRAVELLER) })).status).toBe(403)
  })

  it('demo sites carry cloud %, P(clear) and expected seconds with the demo label', async () => {
    const r = await api('/api/workspaces/1/sites', { cookie: await signIn(ORGANISER) })
    for (const s of r.body.data) {
      expect(s.metrics.cloudPct).toBeTypeOf('number')
      expect(s.metrics.pClear).toBeGreaterThan(0)
      expect(s.metrics.cloudSource).toContain('Demo data — not a real climatology')
      expect(s.metrics.expectedSec).toBeCloseTo(Math.round(s.metrics.durationSec * s.metrics.pClear * 10) / 10, 1)
    }
    const layer = await api('/api/workspaces/1/cloud-layer', { cookie: await signIn(GUIDE) })
    expect(layer.body.demo).toBe(true)
    expect(layer.body.cells.features.length).toBeGreaterThan(100)
    expect(layer.body.profile.length).toBeGreaterThan(10)
  })

  it('rejects each bad file with its reason and stores nothing', async () => {
    const org = await signIn(ORGANISER)
    const before = await counts()
    const cases: Array<[string, Record<string, string>, { name: string; data: Uint8Array | string }, RegExp]> = [
      ['projected CRS', { name: 'x', source: 'test', month: '8' }, { name: 'p.tif', data: uniformTiff(20, { GeographicTypeGeoKey: undefined, ProjectedCSTypeGeoKey: 32636, GTModelTypeGeoKey: 1 }) }, /Wrong CRS/],
      ['out of range', { name: 'x', source: 'test', month: '8' }, { name: 'o.tif', data: uniformTiff(150) }, /out of range/],
      ['ragged CSV', { name: 'x', source: 'test' }, { name: 'r.csv', data: 'lat,lon,month,cloud_pct\n10,20,8,5\n10,21,8,5\n11,20,8,5\n' }, /Ragged grid/],
      ['bad month', { name: 'x', source: 'test' }, { name: 'm.csv', data: 'lat,lon,month,cloud_pct\n10,20,0,5\n' }, /month must be a whole number/],
      ['second month broken', { name: 'x', source: 'test' }, { name: 'm2.csv', data: 'lat,lon,month,cloud_pct\n10,20,7,5\n10,21,7,5\n11,20,7,5\n11,21,7,5\n10,20,8,5\n10,21,8,5\n11,20,8,5\n' }, /month 8 is missing/],
    ]
    for (const [what, fields, file, msg] of cases) {
      const r = await upload(fields, file, org)
      expect(r.status, what).toBe(400)
      expect(r.body.message, what).toMatch(msg)
    }
    const noName = await upload({ source: 'test', month: '8' }, { name: 'u.tif', data: uniformTiff(20) }, org)
    expect(noName.status).toBe(400)
    expect(noName.body.data.fields.name).toMatch(/required/)
    expect(await counts()).toEqual(before)
    expect((await upload({ name: 'x', source: 'y', month: '8' }, { name: 'u.tif', data: uniformTiff(20) }, await signIn(GUIDE))).status).toBe(403)
  })

  it('an uploaded GeoTIFF, chosen for the workspace, changes the numbers; an override wins', async () => {
    const org = await signIn(ORGANISER)
    const up = await upload({ name: 'Uniform 20 %', source: 'test fixture', month: '8', years: '2001–2020', timeOfDay: '10:00 local' }, { name: 'uniform.tif', data: uniformTiff(0.2) }, org)
    expect(up.status).toBe(201)
    expect(up.body.months).toEqual([8])
    expect((await api('/api/workspaces/1', { method: 'PATCH', body: { climatologyId: up.body.id }, cookie: org })).status).toBe(200)
    const r = await api('/api/workspaces/1/sites', { cookie: org })
    const luxor = r.body.data.find((s: { name: string }) => s.name.startsWith('Luxor'))
    expect(luxor.metrics.cloudPct).toBeCloseTo(20, 3) // a fraction 0.2 read as 20 %
    expect(luxor.metrics.pClear).toBeCloseTo(0.8, 3)
    expect(luxor.metrics.pClearMethod).toMatch(/simpler estimate/)
    expect(luxor.metrics.cloudSource).toBe('Uniform 20 %')
    // The grid spans 20–38° N: a site further south is reported as outside it.
    const created = await api('/api/workspaces/1/sites', { method: 'POST', body: { name: 'South of grid', lat: 15.5, lon: 40 }, cookie: org })
    expect(created.body.metrics.cloudPct).toBeNull()
    expect(created.body.metrics.cloudNote).toBe('site is outside the climatology grid')

    const bad = await api(`/api/sites/${luxor.id}`, { method: 'PATCH', body: { cloudOverridePct: 5 }, cookie: org })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.cloudOverrideNote).toMatch(/where the override comes from/)
    const o = await api(`/api/sites/${luxor.id}`, { method: 'PATCH', body: { cloudOverridePct: 5, cloudOverrideNote: 'Luxor airport records' }, cookie: org })
    expect(o.body.metrics.cloudPct).toBe(5)
    expect(o.body.metrics.cloudSource).toBe('manual override: Luxor airport records')
    expect(o.body.metrics.expectedSec).toBeCloseTo(o.body.metrics.durationSec * 0.95, 0)
    const cleared = await api(`/api/sites/${luxor.id}`, { method: 'PATCH', body: { cloudOverridePct: null }, cookie: org })
    expect(cleared.body.metrics.cloudPct).toBeCloseTo(20, 3)
  })

  it('a CSV grid upload works the same way', async () => {
    const org = await signIn(ORGANISER)
    const rows = ['lat,lon,month,cloud_pct,clear_pct,scattered_pct,broken_pct']
    for (let lat = 20; lat <= 40; lat += 5) for (let lon = -10; lon <= 45; lon += 5) rows.push(`${lat},${lon},8,30,60,10,10`)
    const up = await upload({ name: 'Thirty', source: 'test fixture' }, { name: 'thirty.csv', data: rows.join('\n') }, org)
    expect(up.status).toBe(201)
    await api('/api/workspaces/1', { method: 'PATCH', body: { climatologyId: up.body.id }, cookie: org })
    const s = (await api('/api/workspaces/1/sites', { cookie: org })).body.data[0]
    expect(s.metrics.cloudPct).toBe(30)
    expect(Math.abs(s.metrics.pClear - (0.6 + 0.072 + 0.0225))).toBeLessThanOrEqual(0.0006) // rounded to 3 places
  })
})
